/**
 * SID tables as JSON, described by schemas/sid-table.schema.json (`sidcarve/sid-table/v1`).
 */
import type { Prefix } from "../net/prefix.js";
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

/** Streamed form of tableToJson: same bytes, produced node by node (`nodes` may be made as they are asked for). */
export function* jsonChunks(t: Pick<SidTable, "plan"> & Partial<SidTable>, nodes: Iterable<NodeTable> = t.nodes ?? []): Generator<string> {
  yield `{\n  "schema": ${JSON.stringify(SID_TABLE_SCHEMA_ID)},\n  "plan": ${JSON.stringify(t.plan)},\n  "caution": ${JSON.stringify(CAUTION)},\n  "nodes": [`;
  let first = true;
  const cache = new TextCache();
  for (const n of nodes) {
    yield (first ? "\n    " : ",\n    ") + nodeText(n, "    ", cache);
    first = false;
  }
  yield first ? "]\n}\n" : "\n  ]\n}\n";
}

// ---- JSON.stringify(nodeJson(n), null, 2) written directly, each line after the first indented by `pad`

const str = (s: string) => JSON.stringify(s);
const num = (n: number) => JSON.stringify(n);

/**
 * Texts that many SIDs share, made once per emitted document: locators and flavour lists are
 * shared objects in an allocation. Every text depends on the indent too, which is
 * the same for every SID of one document (one cache per document).
 */
class TextCache {
  readonly locators = new WeakMap<Prefix, string>();
  readonly flavors = new WeakMap<readonly string[], string>();
}

/** One node's entry as JSON.stringify(nodeJson(n), null, 2) would print it, lines after the first prefixed by `pad`. */
function nodeText(n: NodeTable, pad: string, cache: TextCache): string {
  const p1 = pad + "  ";
  const p2 = p1 + "  ";
  const p3 = p2 + "  ";
  let out = `{\n${p1}"node": ${str(n.node)},\n${p1}"locators": `;
  if (n.locators.length === 0) out += "[]";
  else {
    out += "[";
    n.locators.forEach((l, i) => {
      out += `${i ? "," : ""}\n${p2}{\n${p3}"prefix": ${str(l.prefix.format())},\n${p3}"algorithm": ${num(l.algorithm)},\n${p3}"block": ${str(l.block)},\n${p3}"anycast": ${l.anycast === "" ? "null" : str(l.anycast)}\n${p2}}`;
    });
    out += `\n${p1}]`;
  }
  out += `,\n${p1}"sids": `;
  if (n.sids.length === 0) out += "[]";
  else {
    out += "[";
    for (let i = 0; i < n.sids.length; i++) out += `${i ? "," : ""}\n${p2}${sidText(n.sids[i]!, p2, cache)}`;
    out += `\n${p1}]`;
  }
  return out + `\n${pad}}`;
}

/** Keys of a context in the order JSON.stringify prints the sorted object of sidJson; undefined when unusual. */
function contextKeys(c: Readonly<Record<string, string>>): string[] | undefined {
  const keys = Object.keys(c).sort();
  for (const k of keys) {
    // integer-like keys are printed first by JSON.stringify, and non-string values need its rules
    if (typeof c[k] !== "string" || /^(0|[1-9][0-9]*)$/.test(k)) return undefined;
  }
  return keys;
}

/**
 * The context object's text at this indent, or null when it is unusual (then JSON.stringify
 * prints the SID). Not cached: most contexts belong to one or two SIDs (see RowCache in csv.ts).
 */
function contextText(c: Readonly<Record<string, string>>, p1: string, p2: string): string | null {
  const ctxKeys = contextKeys(c);
  if (ctxKeys === undefined) return null;
  if (ctxKeys.length === 0) return "{}";
  let t = "{";
  for (let i = 0; i < ctxKeys.length; i++) t += `${i ? "," : ""}\n${p2}${str(ctxKeys[i]!)}: ${str(c[ctxKeys[i]!]!)}`;
  return t + `\n${p1}}`;
}

/** The flavour list's text at this indent, or null when an entry is not a string. */
function flavorText(f: readonly string[], p1: string, p2: string, cache: TextCache): string | null {
  let t = cache.flavors.get(f);
  if (t !== undefined) return t;
  if (!f.every((x) => typeof x === "string")) return null;
  if (f.length === 0) t = "[]";
  else {
    t = "[";
    f.forEach((x, i) => (t += `${i ? "," : ""}\n${p2}${str(x)}`));
    t += `\n${p1}]`;
  }
  cache.flavors.set(f, t);
  return t;
}

/** One SID as JSON.stringify(sidJson(s), null, 2) prints it, lines after the first prefixed by `pad`. */
function sidText(s: SidEntry, pad: string, cache: TextCache): string {
  const p1 = pad + "  ";
  const p2 = p1 + "  ";
  const ctx = contextText(s.context, p1, p2);
  const flv = ctx === null || typeof s.behavior !== "string" ? null : flavorText(s.flavors, p1, p2, cache);
  if (ctx === null || flv === null) {
    return JSON.stringify(sidJson(s), null, 2).replace(/\n/g, "\n" + pad);
  }
  const st = s.structure;
  let loc = "null";
  if (s.locator) {
    const known = cache.locators.get(s.locator);
    if (known !== undefined) loc = known;
    else cache.locators.set(s.locator, (loc = `"${s.locator.format()}"`));
  }
  return (
    // addresses, prefixes and hex numbers hold only [0-9a-f:./x], which JSON never escapes
    `{\n${p1}"sid": "${formatAddr(s.sid)}",\n${p1}"behavior": ${str(s.behavior)},\n${p1}"flavors": ${flv},\n${p1}"codepoint": ${s.codepoint === undefined ? "null" : num(s.codepoint)},` +
    `\n${p1}"algorithm": ${num(s.algorithm)},\n${p1}"locator": ${loc},\n${p1}"function": "0x${s.function.toString(16)}",` +
    `\n${p1}"structure": ${st ? `{\n${p2}"block": ${num(st.block)},\n${p2}"node": ${num(st.node)},\n${p2}"function": ${num(st.function)},\n${p2}"argument": ${num(st.argument)}\n${p1}}` : "null"},` +
    `\n${p1}"context": ${ctx}\n${pad}}`
  );
}
