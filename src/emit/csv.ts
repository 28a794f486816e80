/**
 * SID tables as CSV (RFC 4180): one row per SID, rows sorted, CRLF line ends, a leading
 * `#` comment line with the plan name and the caution.
 */
import { formatAddr } from "../net/text.js";
import { type NodeTable, type SidEntry, type SidTable, formatContext } from "../sid/table.js";
import { CAUTION } from "./caution.js";
import { csvCell } from "./names.js";

export const CSV_HEADER = [
  "node",
  "algorithm",
  "locator",
  "sid",
  "behavior",
  "flavors",
  "codepoint",
  "function",
  "block_bits",
  "node_bits",
  "function_bits",
  "argument_bits",
  "context",
] as const;

/** The first line of every CSV we write; also how we recognise our own files. */
export function csvBanner(plan: string): string {
  return `# sidcarve SID table, plan ${plan.replace(/[\r\n]/g, " ")}. ${CAUTION}`;
}

/** One CSV row for a SID (no line end). */
export function csvRow(node: string, s: SidEntry): string {
  return [
    node,
    String(s.algorithm),
    s.locator ? s.locator.format() : "",
    formatAddr(s.sid),
    s.behavior,
    s.flavors.join("+"),
    s.codepoint === undefined ? "" : String(s.codepoint),
    "0x" + s.function.toString(16),
    s.structure ? String(s.structure.block) : "",
    s.structure ? String(s.structure.node) : "",
    s.structure ? String(s.structure.function) : "",
    s.structure ? String(s.structure.argument) : "",
    formatContext(s.context),
  ]
    .map(csvCell)
    .join(",");
}

/** The whole table (or the given nodes) as CSV text, in pieces so that large tables can be streamed. */
export function* csvChunks(plan: string, nodes: readonly NodeTable[]): Generator<string> {
  yield csvBanner(plan) + "\r\n";
  yield CSV_HEADER.join(",") + "\r\n";
  for (const n of nodes) {
    let buf = "";
    for (const s of n.sids) buf += csvRow(n.node, s) + "\r\n";
    if (buf) yield buf;
  }
}

/** The whole table as one CSV string. */
export function tableToCsv(t: SidTable): string {
  return [...csvChunks(t.plan, t.nodes)].join("");
}
