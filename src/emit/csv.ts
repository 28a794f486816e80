/**
 * SID tables as CSV (RFC 4180): one row per SID, rows sorted, CRLF line ends, a leading
 * `#` comment line with the plan name and the caution.
 */
import type { Prefix } from "../net/prefix.js";
import { formatAddr, formatWordsInto } from "../net/text.js";
import { wordsInto } from "../net/uint128.js";
import type { PackedSidTable } from "../sid/packed.js";
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

/** A number's cell: csvCell(String(n)), which leaves a number that is not negative unchanged. */
function num(n: number): string | number {
  return n >= 0 ? n : csvCell(String(n));
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
    num(s.algorithm) +
    "," +
    c.locator(s.locator) +
    "," +
    formatAddr(s.sid) +
    "," +
    c.cell(s.behavior) +
    "," +
    c.flavorCell(s.flavors) +
    "," +
    (s.codepoint === undefined ? "" : num(s.codepoint)) +
    ",0x" +
    s.function.toString(16) +
    "," +
    (st ? `${num(st.block)},${num(st.node)},${num(st.function)},${num(st.argument)}` : ",,,") +
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

const utf8 = new TextEncoder();

/** UTF-8 bytes of a string; ASCII without TextEncoder (whose cost per call is high for short strings). */
function utf8Bytes(t: string): Uint8Array {
  const b = new Uint8Array(t.length);
  for (let i = 0; i < t.length; i++) {
    const ch = t.charCodeAt(i);
    if (ch > 0x7f) return utf8.encode(t);
    b[i] = ch;
  }
  return b;
}

/** UTF-8 bytes of a cell after csvCell. */
function cellBytes(v: string): Uint8Array {
  return utf8Bytes(csvCell(v));
}

/** A formula character that csvCell neutralises at the start of a cell: = + - @ tab CR. */
function formulaStart(ch: number): boolean {
  return ch === 0x3d || ch === 0x2b || ch === 0x2d || ch === 0x40 || ch === 0x09 || ch === 0x0d;
}

/**
 * Write `t` at `p` when every character is ASCII other than quote, comma, CR and LF (text that
 * csvCell leaves alone unless it starts with a formula character) and it fits; returns the
 * position after it, or -1 (with part of it written) otherwise.
 */
function plainInto(buf: Uint8Array, p: number, t: string): number {
  const n = t.length;
  if (p + n > buf.length) return -1;
  for (let i = 0; i < n; i++) {
    const ch = t.charCodeAt(i);
    if (ch > 0x7f || ch === 0x22 || ch === 0x2c || ch === 0x0d || ch === 0x0a) return -1;
    buf[p++] = ch;
  }
  return p;
}

/** Pre-encoded bytes at `p` (room was made); returns the position after them. */
function bytesInto(buf: Uint8Array, p: number, b: Uint8Array): number {
  const n = b.length;
  if (n > 32) {
    buf.set(b, p);
    return p + n;
  }
  for (let i = 0; i < n; i++) buf[p++] = b[i]!;
  return p;
}

/** A whole number 0..2^32-1 in decimal at `p` (room was made); -1 for any other number. */
function uintInto(buf: Uint8Array, p: number, n: number): number {
  if (n >>> 0 !== n) return -1; // negative, fractional, too large or NaN: csvCell(String(n)) instead
  let end = p + 1;
  for (let m = n; m >= 10; m = Math.floor(m / 10)) end++;
  p = end;
  do {
    buf[--end] = 0x30 + (n % 10);
    n = Math.floor(n / 10);
  } while (n > 0);
  return p;
}

const HEX_DIGITS = Uint8Array.from("0123456789abcdef", (ch) => ch.charCodeAt(0));

/** `0x` and f (0..2^32-1) in lower-case hex at `p` (room was made); -1 for other values. */
function functionInto(buf: Uint8Array, p: number, f: bigint): number {
  if (f < 0n || f > 0xffffffffn) return -1; // "0x" + f.toString(16) instead
  return hexInto(buf, p, Number(f));
}

/** `0x` and n in lower-case hex at `p` (room was made) for a whole number 0..2^32-1; -1 for any other number. */
function hexInto(buf: Uint8Array, p: number, n: number): number {
  if (n >>> 0 !== n) return -1;
  buf[p++] = 0x30;
  buf[p++] = 0x78;
  let end = p + 1;
  for (let m = n >>> 4; m > 0; m >>>= 4) end++;
  p = end;
  do {
    buf[--end] = HEX_DIGITS[n & 15]!;
    n >>>= 4;
  } while (n > 0);
  return p;
}

/** Where addressInto has the words of an address put. */
const addrWords = new Uint32Array(4);

/** formatAddr(a) at `p` (room was made): the low 128 bits, as formatAddr's masks take them. */
function addressInto(buf: Uint8Array, p: number, a: bigint): number {
  wordsInto(a, addrWords);
  return formatWordsInto(buf, p, addrWords[0]!, addrWords[1]!, addrWords[2]!, addrWords[3]!);
}

/** How many key lists (as Object.keys gives them) KeyOrders keeps; an allocation has a handful. */
const KEY_LISTS = 16;

/**
 * Context key lists seen lately, each with its keys sorted and as bytes (`k=` for the first,
 * `;k=` for the others), so that a context is sorted and its keys encoded once per list rather
 * than once per SID. Keyed by the lists' contents, not by the contexts (one per SID or so).
 */
class KeyOrders {
  private readonly lists: (readonly string[])[] = [];
  private readonly sorted: (readonly string[])[] = [];
  /** undefined when a key is not plain ASCII or the text would start with a formula character. */
  private readonly bytes: (readonly Uint8Array[] | undefined)[] = [];
  private next = 0;
  /** Set by find(): the sorted keys and their bytes. */
  keys: readonly string[] = [];
  keyBytes: readonly Uint8Array[] | undefined;

  find(keys: readonly string[]): void {
    const n = keys.length;
    const lists = this.lists;
    for (let e = 0; e < lists.length; e++) {
      const l = lists[e]!;
      if (l.length !== n) continue;
      let i = 0;
      while (i < n && l[i] === keys[i]) i++;
      if (i === n) {
        this.keys = this.sorted[e]!;
        this.keyBytes = this.bytes[e];
        return;
      }
    }
    const sorted = n > 1 ? [...keys].sort() : keys;
    const k0 = sorted[0]!;
    // an empty first key puts '=' first
    const plain = k0.length > 0 && !formulaStart(k0.charCodeAt(0)) && sorted.every((k) => plainInto(scratchKey, 0, k) >= 0);
    const kb = plain ? sorted.map((k, i) => utf8Bytes(i === 0 ? `${k}=` : `;${k}=`)) : undefined;
    const e = lists.length < KEY_LISTS ? lists.length : this.next++ % KEY_LISTS;
    lists[e] = keys;
    this.sorted[e] = sorted;
    this.bytes[e] = kb;
    this.keys = sorted;
    this.keyBytes = kb;
  }
}
/** Where KeyOrders tries keys (long keys do not fit and take the csvCell path). */
const scratchKey = new Uint8Array(256);

/**
 * csvCell(formatContext(c)) at `p` when the text is plain (see plainInto), its first character
 * is not a formula character and it fits; returns the position after it, or -1.
 */
function contextInto(buf: Uint8Array, p: number, c: SidContext, orders: KeyOrders): number {
  const keys = Object.keys(c);
  const n = keys.length;
  if (n === 0) return p;
  orders.find(keys);
  const kb = orders.keyBytes;
  if (kb === undefined) return -1;
  const sorted = orders.keys;
  for (let i = 0; i < n; i++) {
    const k = kb[i]!;
    if (p + k.length > buf.length) return -1;
    p = bytesInto(buf, p, k);
    const v = c[sorted[i]!];
    p = plainInto(buf, p, typeof v === "string" ? v : `${v}`);
    if (p < 0) return -1;
  }
  return p;
}

/** Room for the cells a row writes without a check of their own (numbers, address, commas, CRLF). */
const ROW_FIXED = 192;
/** Room made at the start of each row beyond that, for the context (which checks, and falls back when short). */
const ROW_SPARE = 512;

/** The buffer being filled; writeRows leaves in it what it wrote. */
interface ByteOut {
  buf: Uint8Array;
  pos: number;
}

/** `buf` with room for `n` more bytes at `p` (a larger copy when it has not). */
function room(buf: Uint8Array, p: number, n: number): Uint8Array {
  if (p + n <= buf.length) return buf;
  const b = new Uint8Array(Math.max(buf.length * 2, p + n));
  b.set(buf.subarray(0, p));
  return b;
}

/**
 * Text `t` (UTF-8, as it is: csvCell's result, the banner) into `buf` at `p`, with room beyond it
 * for `margin` bytes more. The buffer may be replaced by a larger copy: it is left in `out.buf`,
 * where the caller takes it back from.
 */
function textInto(out: ByteOut, buf: Uint8Array, p: number, t: string, margin: number): number {
  const b = (out.buf = room(buf, p, t.length * 3 + margin));
  return p + utf8.encodeInto(t, b.subarray(p)).written;
}

/** A number's cell, as csvCell(String(n)): digits when it is a whole number 0..2^32-1, else through textInto. */
function numInto(out: ByteOut, buf: Uint8Array, p: number, n: number, margin: number): number {
  const q = uintInto(buf, p, n);
  return q >= 0 ? q : textInto(out, buf, p, csvCell(String(n)), margin);
}

/** The cells that repeat, encoded once (see csvByteChunks). */
class CellCache {
  private readonly locators = new WeakMap<Prefix, Uint8Array>();
  private readonly flavorLists = new WeakMap<readonly string[], Uint8Array>();
  private readonly behaviors = new Map<string, Uint8Array>();
  private lastLocator: Prefix | undefined;
  private lastLocatorBytes = NO_BYTES;
  private lastFlavors: readonly string[] | undefined;
  private lastFlavorBytes = NO_BYTES;
  private lastBehavior: string | undefined;
  private lastBehaviorBytes = NO_BYTES;
  readonly orders = new KeyOrders();

  locator(p: Prefix | undefined): Uint8Array {
    if (p === this.lastLocator) return this.lastLocatorBytes;
    let b = NO_BYTES;
    if (p !== undefined) {
      const known = this.locators.get(p);
      if (known === undefined) this.locators.set(p, (b = cellBytes(p.format())));
      else b = known;
    }
    this.lastLocator = p;
    return (this.lastLocatorBytes = b);
  }

  flavors(f: readonly string[]): Uint8Array {
    if (f === this.lastFlavors) return this.lastFlavorBytes;
    let b = NO_BYTES;
    if (f.length > 0) {
      const known = this.flavorLists.get(f);
      if (known === undefined) this.flavorLists.set(f, (b = cellBytes(f.join("+"))));
      else b = known;
    }
    this.lastFlavors = f;
    return (this.lastFlavorBytes = b);
  }

  behavior(v: string): Uint8Array {
    if (v === this.lastBehavior) return this.lastBehaviorBytes;
    let b = this.behaviors.get(v);
    if (b === undefined) {
      b = cellBytes(v);
      if (this.behaviors.size < 4096) this.behaviors.set(v, b);
    }
    this.lastBehavior = v;
    return (this.lastBehaviorBytes = b);
  }
}

const NO_BYTES: Uint8Array = new Uint8Array(0);

/**
 * Write the rows of `sids` from index `from` into `out` until the buffer holds `stop` bytes or
 * more, or the SIDs run out; returns the index of the next SID to write. `nodeBytes` is the
 * node's cell.
 */
function writeRows(out: ByteOut, nodeBytes: Uint8Array, sids: readonly SidEntry[], from: number, stop: number, cache: CellCache): number {
  let buf = out.buf;
  let p = out.pos;
  let i = from;
  while (i < sids.length && p < stop) {
    const s = sids[i++]!;
    const loc = cache.locator(s.locator);
    const beh = cache.behavior(s.behavior);
    const fl = cache.flavors(s.flavors);
    // the cells above are written unchecked, and so are numbers, the address, commas and CRLF;
    // a write that falls back to text makes room again for all of that (margin)
    const margin = ROW_FIXED + nodeBytes.length + loc.length + beh.length + fl.length;
    if (p + margin + ROW_SPARE > buf.length) out.buf = buf = room(buf, p, margin + ROW_SPARE);
    // (out.buf is the buffer throughout; the writes that may replace it leave the new one there)
    p = bytesInto(buf, p, nodeBytes);
    buf[p++] = 0x2c;
    p = numInto(out, buf, p, s.algorithm, margin);
    buf = out.buf;
    buf[p++] = 0x2c;
    p = bytesInto(buf, p, loc);
    buf[p++] = 0x2c;
    p = addressInto(buf, p, s.sid);
    buf[p++] = 0x2c;
    p = bytesInto(buf, p, beh);
    buf[p++] = 0x2c;
    p = bytesInto(buf, p, fl);
    buf[p++] = 0x2c;
    if (s.codepoint !== undefined) {
      p = numInto(out, buf, p, s.codepoint, margin);
      buf = out.buf;
    }
    buf[p++] = 0x2c;
    let q = functionInto(buf, p, s.function);
    if (q < 0) {
      q = textInto(out, buf, p, "0x" + s.function.toString(16), margin); // csvCell leaves it unchanged
      buf = out.buf;
    }
    p = q;
    buf[p++] = 0x2c;
    const st = s.structure;
    if (st) {
      p = numInto(out, buf, p, st.block, margin);
      buf = out.buf;
      buf[p++] = 0x2c;
      p = numInto(out, buf, p, st.node, margin);
      buf = out.buf;
      buf[p++] = 0x2c;
      p = numInto(out, buf, p, st.function, margin);
      buf = out.buf;
      buf[p++] = 0x2c;
      p = numInto(out, buf, p, st.argument, margin);
      buf = out.buf;
      buf[p++] = 0x2c;
    } else {
      buf[p++] = 0x2c;
      buf[p++] = 0x2c;
      buf[p++] = 0x2c;
      buf[p++] = 0x2c;
    }
    q = contextInto(buf, p, s.context, cache.orders);
    if (q < 0) {
      q = textInto(out, buf, p, csvCell(formatContext(s.context)), 2);
      buf = out.buf;
    }
    p = q;
    buf[p++] = 0x0d;
    buf[p++] = 0x0a;
  }
  out.pos = p;
  return i;
}

/** PackedCells of the tables csvPackedChunks has written. */
const packedCells = new WeakMap<PackedSidTable, PackedCells>();

/** The cells of a packed table that repeat, encoded once per id (see csvPackedChunks). */
class PackedCells {
  readonly behaviors: readonly Uint8Array[];
  readonly flavors: readonly Uint8Array[];
  /** Structure cells with the comma after each: `block,node,function,argument,`. */
  readonly structures: readonly Uint8Array[];
  private readonly locators: (Uint8Array | undefined)[] = [];
  private readonly nodes: (Uint8Array | undefined)[] = [];

  constructor(private readonly t: PackedSidTable) {
    this.behaviors = t.behaviors.map(cellBytes);
    this.flavors = t.flavorSets.map((f) => (f.length > 0 ? cellBytes(f.join("+")) : NO_BYTES));
    this.structures = t.structures.map((st) => utf8Bytes([st.block, st.node, st.function, st.argument].map((n) => csvCell(String(n)) + ",").join("")));
  }

  locator(id: number): Uint8Array {
    if (id < 0) return NO_BYTES;
    let b = this.locators[id];
    if (b === undefined) this.locators[id] = b = cellBytes(this.t.prefixes[this.t.locPrefix[id]!]!.format());
    return b;
  }

  node(id: number): Uint8Array {
    let b = this.nodes[id];
    if (b === undefined) this.nodes[id] = b = cellBytes(this.t.nodeNames[id]!);
    return b;
  }

  /** The cells from behaviour to codepoint, each with its comma: `behavior,flavors,codepoint,` (made once per behaviour, flavour list and codepoint). */
  middle(behavior: number, flavorSet: number, codepoint: number): Uint8Array {
    // kept by behaviour and flavour list (both ids below 2^16 make one number), with the first
    // codepoint seen: the codepoint follows from the two (IANA SRv6 Endpoint Behaviors registry,
    // RFC 8986 §10.2), so others are rare
    const k = behavior < 65536 && flavorSet < 65536 ? behavior * 65536 + flavorSet : -1;
    const known = k < 0 ? undefined : this.middles.get(k);
    // codepoint NaN: none (NaN !== NaN, hence the second test)
    if (known !== undefined && (known.codepoint === codepoint || (known.codepoint !== known.codepoint && codepoint !== codepoint))) return known.bytes;
    const bytes = concatBytes([this.behaviors[behavior]!, COMMA, this.flavors[flavorSet]!, COMMA, codepoint === codepoint ? numberCell(codepoint) : NO_BYTES, COMMA]);
    if (known === undefined && k >= 0) this.middles.set(k, { codepoint, bytes });
    return bytes;
  }

  private readonly middles = new Map<number, { readonly codepoint: number; readonly bytes: Uint8Array }>();
}

const COMMA = Uint8Array.of(0x2c);

/** A number's cell as numInto writes it: digits for a whole number 0..2^32-1, else csvCell(String(n)). */
function numberCell(n: number): Uint8Array {
  return n >>> 0 === n ? utf8Bytes(String(n)) : cellBytes(String(n));
}

/** The cells from node to locator, each with its comma: `node,algorithm,locator,`. */
function leadCell(node: Uint8Array, algorithm: number, locator: Uint8Array): Uint8Array {
  return concatBytes([node, COMMA, numberCell(algorithm), COMMA, locator, COMMA]);
}

function concatBytes(parts: readonly Uint8Array[]): Uint8Array {
  let n = 0;
  for (const p of parts) n += p.length;
  const out = new Uint8Array(n);
  n = 0;
  for (const p of parts) {
    out.set(p, n);
    n += p.length;
  }
  return out;
}
/** The structure cells of a SID without a structure: four commas. */
const NO_STRUCTURE = utf8Bytes(",,,,");

/**
 * writeRows for rows `order[from] .. order[end - 1]` (rows from .. end - 1 without an order) of a packed table (one node's, `nodeBytes`
 * its cell): the same cells, read from the columns. Returns the position in `order` to go on from.
 */
function writePackedRows(out: ByteOut, nodeBytes: Uint8Array, t: PackedSidTable, order: Int32Array | undefined, from: number, end: number, stop: number, cells: PackedCells, orders: KeyOrders): number {
  const { w0, w1, w2, w3, locator, behavior, flavorSet, structure, algorithm, codepoint, fn, context } = t;
  let buf = out.buf;
  let p = out.pos;
  let k = from;
  // the cells before the address, and those after it up to the function, each made once for
  // the run of rows that share them (a node's rows come locator by locator, shape by shape)
  let lead = NO_BYTES;
  let leadLocator = -2;
  let leadAlgorithm = NaN;
  let mid = NO_BYTES;
  let midBehavior = -1;
  let midFlavors = -1;
  let midCodepoint = NaN;
  let midMade = false;
  while (k < end && p < stop) {
    const i = order === undefined ? k : order[k]!;
    k++;
    const li = locator[i]!;
    const a = algorithm[i]!;
    if (li !== leadLocator || a !== leadAlgorithm) {
      lead = leadCell(nodeBytes, a, cells.locator(li));
      leadLocator = li;
      leadAlgorithm = a;
    }
    const bi = behavior[i]!;
    const fi = flavorSet[i]!;
    const cp = codepoint[i]!;
    // (codepoint NaN is none: two NaNs are the same codepoint here)
    if (!midMade || bi !== midBehavior || fi !== midFlavors || (cp !== midCodepoint && (cp === cp || midCodepoint === midCodepoint))) {
      mid = cells.middle(bi, fi, cp);
      midBehavior = bi;
      midFlavors = fi;
      midCodepoint = cp;
      midMade = true;
    }
    const sti = structure[i]!;
    const st = sti < 0 ? NO_STRUCTURE : cells.structures[sti]!;
    const margin = ROW_FIXED + lead.length + mid.length + st.length;
    if (p + margin + ROW_SPARE > buf.length) out.buf = buf = room(buf, p, margin + ROW_SPARE);
    p = bytesInto(buf, p, lead);
    p = formatWordsInto(buf, p, w0[i]!, w1[i]!, w2[i]!, w3[i]!);
    buf[p++] = 0x2c;
    p = bytesInto(buf, p, mid);
    let q = hexInto(buf, p, fn[i]!);
    if (q < 0) {
      q = textInto(out, buf, p, "0x" + t.functionAt(i).toString(16), margin);
      buf = out.buf;
    }
    p = q;
    buf[p++] = 0x2c;
    p = bytesInto(buf, p, st);
    const c = t.contextOf(context[i]!);
    q = contextInto(buf, p, c, orders);
    if (q < 0) {
      q = textInto(out, buf, p, csvCell(formatContext(c)), 2);
      buf = out.buf;
    }
    p = q;
    buf[p++] = 0x0d;
    buf[p++] = 0x0a;
  }
  out.pos = p;
  return k;
}

/**
 * Exactly the bytes of `Buffer.from(csvChunks(plan, nodes).join(""), "utf8")`, written as ASCII
 * straight into a reused buffer and yielded in chunks of `chunkBytes` bytes (the last one may be
 * shorter; rows run across chunk boundaries). Each chunk is a fresh copy that the generator never
 * touches again, so a caller may keep or collect them.
 *
 * Cells that repeat are encoded once: the node cell per node, behaviours by text, locators and
 * flavour lists by object (one locator per node and algorithm, flavour lists shared by all SIDs
 * of a shape), each with the last one kept at hand; context keys per key list. Numbers, the
 * function's hex digits, the SID address and context values are written character by character
 * (contexts are mostly one object per SID, so they have no cache). Anything csvCell would change,
 * or that is not ASCII, goes through csvCell and UTF-8 encoding.
 */
export function* csvByteChunks(plan: string, nodes: readonly NodeTable[], chunkBytes = 1 << 20): Generator<Uint8Array> {
  const cache = new CellCache();
  let last: NodeTable | undefined;
  let nodeBytes = NO_BYTES;
  yield* chunked(plan, chunkBytes, nodes, (out, n, from, stop) => {
    if (n !== last) nodeBytes = cellBytes((last = n).node);
    const next = writeRows(out, nodeBytes, n.sids, from, stop, cache);
    return next >= n.sids.length ? -1 : next;
  });
}

/**
 * The bytes of csvByteChunks for the given nodes (ids into `t.nodeNames`) of a packed table,
 * written from its columns: no SidEntry is made. Each node's rows come in the table's order (an
 * allocation's are sorted already). Cells that repeat are encoded once per id: behaviour,
 * flavour list, structure, locator. Tests check it against csvByteChunks over `t.toTable()`.
 */
export function* csvPackedChunks(t: PackedSidTable, nodeIds: readonly number[], chunkBytes = 1 << 20): Generator<Uint8Array> {
  // made once per table: --per-node asks for every node in turn
  const rows = t.nodeRows();
  let cells = packedCells.get(t);
  if (cells === undefined) packedCells.set(t, (cells = new PackedCells(t)));
  const orders = new KeyOrders();
  yield* chunked(t.plan, chunkBytes, nodeIds, (out, id, from, stop) => {
    const first = rows.start[id]!;
    const end = rows.start[id + 1]!;
    const next = writePackedRows(out, cells.node(id), t, rows.order, first + from, end, stop, cells, orders);
    return next >= end ? -1 : next - first;
  });
}

/**
 * The banner and header, then each unit's rows as `write` puts them in the buffer, cut into
 * chunks of `chunkBytes` bytes (the last may be shorter; rows run across chunk boundaries). `write`
 * writes the unit's rows from `from` on until the buffer holds `stop` bytes or more and returns
 * the row to go on from, or -1 when the unit is done. Each chunk is a fresh copy that is never
 * touched again, so a caller may keep or collect them.
 */
function* chunked<U>(plan: string, chunkBytes: number, units: readonly U[], write: (out: ByteOut, unit: U, from: number, stop: number) => number): Generator<Uint8Array> {
  if (!Number.isSafeInteger(chunkBytes) || chunkBytes < 1) throw new RangeError(`chunkBytes must be a whole number of at least 1, got ${chunkBytes}`);
  // small at first (a table of one node, as --per-node writes, is often a few kB); grows by
  // doubling to about a chunk
  const out: ByteOut = { buf: new Uint8Array(Math.min(chunkBytes + 4096, 1 << 14)), pos: 0 };
  out.pos = textInto(out, out.buf, 0, csvBanner(plan) + "\r\n" + CSV_HEADER.join(",") + "\r\n", 0);
  for (const u of units) {
    for (let i = 0; i >= 0; ) {
      i = write(out, u, i, chunkBytes);
      if (out.pos >= chunkBytes) {
        // cut off every whole chunk; the rest moves to the front
        let at = 0;
        while (out.pos - at >= chunkBytes) {
          yield out.buf.slice(at, at + chunkBytes);
          at += chunkBytes;
        }
        out.buf.copyWithin(0, at, out.pos);
        out.pos -= at;
      }
    }
  }
  let at = 0;
  while (out.pos - at > chunkBytes) {
    yield out.buf.slice(at, at + chunkBytes);
    at += chunkBytes;
  }
  if (out.pos > at) yield out.buf.slice(at, out.pos);
}

/**
 * UTF-8 byte chunks as text chunks, for writers that take strings (standard output): a chunk
 * may end inside a character, whose bytes are then held over to the next one.
 */
export function* textChunks(chunks: Iterable<Uint8Array>): Generator<string> {
  const text = new TextDecoder("utf-8", { fatal: true });
  for (const c of chunks) {
    const s = text.decode(c, { stream: true });
    if (s) yield s;
  }
  const rest = text.decode();
  if (rest) yield rest;
}

/** The whole table as one CSV string. */
export function tableToCsv(t: SidTable): string {
  return [...csvChunks(t.plan, t.nodes)].join("");
}
