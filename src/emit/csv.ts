/**
 * SID tables as CSV (RFC 4180): one row per SID, rows sorted, CRLF line ends, a leading
 * `#` comment line with the plan name and the caution.
 */
import type { Prefix } from "../net/prefix.js";
import { formatAddr } from "../net/text.js";
import { type NodeTable, type SidContext, type SidEntry, type SidTable, formatContext } from "../sid/table.js";
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

/**
 * One CSV row for a SID (no line end): the readable form. csvChunks writes the same bytes with
 * the cells that repeat (node, locator, flavours, context) formatted once per object.
 */
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

/**
 * Cells that many SIDs share, formatted once: locators and flavour lists are shared objects in an
 * allocation (contexts mostly are not, so they are formatted each time, without a cache whose
 * upkeep would cost more than it saves). Only the cells csvCell can change (node, behaviour,
 * flavours, context) go through it; the others are numbers and addresses it leaves as they are.
 */
class RowCache {
  private readonly locators = new WeakMap<Prefix, string>();
  private readonly flavors = new WeakMap<readonly string[], string>();
  private readonly texts = new Map<string, string>();

  cell(v: string): string {
    let c = this.texts.get(v);
    if (c === undefined) {
      c = csvCell(v);
      if (this.texts.size < 4096) this.texts.set(v, c);
    }
    return c;
  }

  locator(p: Prefix | undefined): string {
    if (!p) return "";
    let t = this.locators.get(p);
    if (t === undefined) {
      t = csvCell(p.format());
      this.locators.set(p, t);
    }
    return t;
  }

  /**
   * csvCell(formatContext(c)), without formatContext's intermediate arrays. Not cached: most
   * contexts belong to one or two SIDs, and a WeakMap over a million of them costs the garbage
   * collector more than formatting does.
   */
  context(c: SidContext): string {
    const keys = Object.keys(c);
    if (keys.length === 0) return "";
    if (keys.length > 1) keys.sort();
    let text = `${keys[0]}=${c[keys[0]!]}`;
    for (let i = 1; i < keys.length; i++) text += `;${keys[i]}=${c[keys[i]!]}`;
    return plainCell(text) ? text : csvCell(text);
  }

  flavorCell(f: readonly string[]): string {
    let t = this.flavors.get(f);
    if (t === undefined) {
      t = csvCell(f.join("+"));
      this.flavors.set(f, t);
    }
    return t;
  }
}

/**
 * True when csvCell would return the text unchanged: no formula character first, no quote, comma
 * or line break anywhere (a loop over char codes is cheaper than csvCell's two regular expressions).
 */
function plainCell(t: string): boolean {
  const c0 = t.charCodeAt(0);
  if (c0 === 0x3d || c0 === 0x2b || c0 === 0x2d || c0 === 0x40 || c0 === 0x09 || c0 === 0x0d) return false;
  for (let i = 0; i < t.length; i++) {
    const c = t.charCodeAt(i);
    if (c === 0x22 || c === 0x2c || c === 0x0d || c === 0x0a) return false;
  }
  return true;
}

/**
 * The row of csvRow, built from cached cells; `nodeCell` is csvCell(node). Numbers that are not
 * negative and addresses never start with a formula character or hold a quote, comma or line
 * break, so csvCell would leave them unchanged.
 */
function fastRow(nodeCell: string, s: SidEntry, c: RowCache): string {
  const st = s.structure;
  return (
    nodeCell +
    "," +
    (s.algorithm >= 0 ? s.algorithm : csvCell(String(s.algorithm))) +
    "," +
    c.locator(s.locator) +
    "," +
    formatAddr(s.sid) +
    "," +
    c.cell(s.behavior) +
    "," +
    c.flavorCell(s.flavors) +
    "," +
    (s.codepoint === undefined ? "" : s.codepoint >= 0 ? s.codepoint : csvCell(String(s.codepoint))) +
    ",0x" +
    s.function.toString(16) +
    "," +
    (st ? `${st.block},${st.node},${st.function},${st.argument}` : ",,,") +
    "," +
    c.context(s.context)
  );
}

/** The whole table (or the given nodes) as CSV text, in pieces so that large tables can be streamed. */
export function* csvChunks(plan: string, nodes: readonly NodeTable[]): Generator<string> {
  yield csvBanner(plan) + "\r\n";
  yield CSV_HEADER.join(",") + "\r\n";
  const cache = new RowCache();
  for (const n of nodes) {
    const nodeCell = csvCell(n.node);
    let buf = "";
    for (const s of n.sids) buf += fastRow(nodeCell, s, cache) + "\r\n";
    if (buf) yield buf;
  }
}

/** The whole table as one CSV string. */
export function tableToCsv(t: SidTable): string {
  return [...csvChunks(t.plan, t.nodes)].join("");
}
