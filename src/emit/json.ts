/**
 * SID tables as JSON, described by schemas/sid-table.schema.json (`sidcarve/sid-table/v1`).
 */
import { formatAddr } from "../net/text.js";
import type { NodeTable, SidEntry, SidTable } from "../sid/table.js";
import { CAUTION } from "./caution.js";

export const SID_TABLE_SCHEMA_ID = "sidcarve/sid-table/v1";

function sidJson(s: SidEntry): Record<string, unknown> {
  return {
    sid: formatAddr(s.sid),
    behavior: s.behavior,
    flavors: [...s.flavors],
    codepoint: s.codepoint ?? null,
    algorithm: s.algorithm,
    locator: s.locator ? s.locator.format() : null,
    function: "0x" + s.function.toString(16),
    structure: s.structure ? { block: s.structure.block, node: s.structure.node, function: s.structure.function, argument: s.structure.argument } : null,
    context: Object.fromEntries(Object.keys(s.context).sort().map((k) => [k, s.context[k]])),
  };
}

/** One node's entry in the JSON table. */
export function nodeJson(n: NodeTable): Record<string, unknown> {
  return {
    node: n.node,
    locators: n.locators.map((l) => ({ prefix: l.prefix.format(), algorithm: l.algorithm, block: l.block, anycast: l.anycast === "" ? null : l.anycast })),
    sids: n.sids.map(sidJson),
  };
}

/** The JSON document for the given nodes of a table (two-space indent, trailing newline). */
export function tableToJson(t: SidTable, nodes: readonly NodeTable[] = t.nodes): string {
  return JSON.stringify({ schema: SID_TABLE_SCHEMA_ID, plan: t.plan, caution: CAUTION, nodes: nodes.map(nodeJson) }, null, 2) + "\n";
}

/** Streamed form of tableToJson: same bytes, produced node by node. */
export function* jsonChunks(t: SidTable, nodes: readonly NodeTable[] = t.nodes): Generator<string> {
  yield `{\n  "schema": ${JSON.stringify(SID_TABLE_SCHEMA_ID)},\n  "plan": ${JSON.stringify(t.plan)},\n  "caution": ${JSON.stringify(CAUTION)},\n  "nodes": [`;
  let first = true;
  for (const n of nodes) {
    const body = JSON.stringify(nodeJson(n), null, 2).replace(/\n/g, "\n    ");
    yield (first ? "\n    " : ",\n    ") + body;
    first = false;
  }
  yield first ? "]\n}\n" : "\n  ]\n}\n";
}
