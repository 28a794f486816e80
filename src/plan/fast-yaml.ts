/**
 * A fast reader for the subset of YAML that plans are written in: block mappings and lists,
 * flow mappings and lists (JSON included), one-line plain and quoted scalars, and comments.
 * It builds plain data directly; the yaml library's node objects cost seconds of garbage
 * collection on a large plan. It gives exactly what the library's
 * `parseDocument(text, { uniqueKeys: true, strict: true }).toJS()` gives, or `undefined` when the
 * text is outside the subset or it is not sure, so that the caller falls back to the library.
 * Bailing out is always safe; a wrong value would be a bug.
 *
 * While reading, it also records where every mapping key and value and every list item starts
 * (the offsets the library's node ranges give), so that a caller can locate any path in the
 * data without the library: see FastPositions.
 */

/** Thrown (and caught in fastParse) to give up on the text. */
const BAIL: unique symbol = Symbol("bail");

/**
 * Characters that make the whole text fall back: tabs and other controls (the library has rules
 * of its own for tabs), a CR not followed by LF, C1 controls, BOM and non-characters, and the
 * Unicode spaces and line separators that JavaScript treats as white space while YAML does not.
 */
const BAD_CHARS = /[\x00-\x09\x0b\x0c\x0e-\x1f\x7f-\xa0\u1680\u2000-\u200a\u2028\u2029\u202f\u205f\u3000\ufeff\ufffe\uffff]|\r(?!\n)/;

/** YAML allows implicit keys of at most 1024 characters; stay clear of the edge. */
const MAX_KEY = 1000;

const SP = 32;
const LF = 10;
const HASH = 35;
const DASH = 45;
const COLON = 58;
const COMMA = 44;
const LBRACKET = 91;
const RBRACKET = 93;
const LBRACE = 123;
const RBRACE = 125;
const DQUOTE = 34;
const SQUOTE = 39;
const BACKSLASH = 92;

/** Characters that cannot start a plain scalar in this subset: YAML indicators. */
const NOT_PLAIN_START = new Uint8Array(128);
for (const c of "-?:,[]{}#&*!|>'\"%@`") NOT_PLAIN_START[c.charCodeAt(0)] = 1;

const isFlowIndicator = (c: number) => c === COMMA || c === LBRACKET || c === RBRACKET || c === LBRACE || c === RBRACE;

/** Double-quoted escapes with a fixed meaning (YAML 1.2 §5.7), as the library maps them. */
const ESCAPES: Record<string, string> = {
  "0": "\0",
  a: "\x07",
  b: "\b",
  e: "\x1b",
  f: "\f",
  n: "\n",
  r: "\r",
  t: "\t",
  v: "\v",
  N: "\u0085",
  _: "\u00a0",
  L: "\u2028",
  P: "\u2029",
  " ": " ",
  '"': '"',
  "/": "/",
  "\\": "\\",
};

// The YAML 1.2 core schema, tested in the library's order with the library's patterns.
const NULL_RE = /^(?:~|[Nn]ull|NULL)?$/;
const BOOL_RE = /^(?:[Tt]rue|TRUE|[Ff]alse|FALSE)$/;
const OCT_RE = /^0o[0-7]+$/;
const INT_RE = /^[-+]?[0-9]+$/;
const HEX_RE = /^0x[0-9a-fA-F]+$/;
const NAN_INF_RE = /^(?:[-+]?\.(?:inf|Inf|INF)|\.nan|\.NaN|\.NAN)$/;
const EXP_RE = /^[-+]?(?:\.[0-9]+|[0-9]+(?:\.[0-9]*)?)[eE][-+]?[0-9]+$/;
const FLOAT_RE = /^[-+]?(?:\.[0-9]+|[0-9]+\.[0-9]*)$/;

/** What a plain scalar means under the core schema. */
export function resolvePlain(s: string): unknown {
  const c = s.charCodeAt(0);
  // Cheap guards on the first character and the length pick the patterns that can match at all;
  // the patterns themselves then decide, in the library's order.
  if (c === 110 || c === 78) return s.length === 4 && NULL_RE.test(s) ? null : s; // n N
  if (c === 116 || c === 84 || c === 102 || c === 70) return (s.length === 4 || s.length === 5) && BOOL_RE.test(s) ? c === 116 || c === 84 : s; // t T f F
  if (c === 126 || s.length === 0) return s.length <= 1 ? null : s; // ~ or empty
  if (!(c === 43 || c === DASH || c === 46 || (c >= 48 && c <= 57))) return s; // + - . digits
  if (OCT_RE.test(s)) return parseInt(s.substring(2), 8);
  if (INT_RE.test(s)) return parseInt(s, 10);
  if (HEX_RE.test(s)) return parseInt(s.substring(2), 16);
  if (NAN_INF_RE.test(s)) return s.slice(-3).toLowerCase() === "nan" ? NaN : s[0] === "-" ? Number.NEGATIVE_INFINITY : Number.POSITIVE_INFINITY;
  if (EXP_RE.test(s) || FLOAT_RE.test(s)) return parseFloat(s);
  return s;
}

/**
 * Parse plan text in the subset, or give `undefined` ("use the full library"). The result equals
 * the library's `toJS()` deeply, key order included. Collections nested deeper than `maxDepth`
 * (a top-level mapping is depth 1) also give `undefined`, so a result is never deeper.
 */
export function fastParse(text: string, maxDepth = 128): unknown | undefined {
  return fastParseWithPositions(text, maxDepth)?.data;
}

/** fastParse, with the start of every key, value and item kept for locating paths. */
export function fastParseWithPositions(text: string, maxDepth = 128): { data: unknown; positions: FastPositions } | undefined {
  if (BAD_CHARS.test(text)) return undefined;
  // No scalar spans lines, and a CR only ever comes right before a LF (BAD_CHARS), so dropping
  // it moves no position within its line: lines and columns stay those of the text as given.
  if (text.includes("\r")) text = text.replace(/\r\n/g, "\n");
  const reader = new Reader(text, maxDepth);
  let data: unknown;
  try {
    data = reader.document();
  } catch (e) {
    if (e === BAIL) return undefined;
    throw e;
  }
  return { data, positions: new FastPositions(text, reader.pool.slice(0, reader.poolLen), reader.ref) };
}

function bail(): never {
  throw BAIL;
}

/** Kinds of collection records (the low two bits of a record's header). */
const BLOCK_MAP = 0;
const FLOW_MAP = 1;
const SEQ = 2;

/**
 * Where the nodes of a text that fastParse read start, as offsets into the text (with CRLF
 * turned into LF, which leaves every line and column as it was). A node is named by a `ref`: its
 * offset when it is a scalar, `-(base + 1)` when it is a collection. A collection's record in
 * `pool` is `[count * 4 + kind, start, ...]` followed, for a mapping, by `keyStart, valueRef`
 * per entry and, for a list, by `itemRef` per item, in the order of the text. That is 8 bytes per
 * mapping entry and 4 per list item; keys are not kept but read again from the text when a
 * path goes through their mapping.
 */
export class FastPositions {
  private lineStarts: Int32Array | undefined;
  private keyReader: Reader | undefined;
  /** Key -> entry index, for the larger mappings that a path has gone through. */
  private readonly keyIndex = new Map<number, Map<string, number>>();

  constructor(
    private readonly text: string,
    private readonly pool: Int32Array,
    /** The document's root node. */
    readonly root: number,
  ) {}

  kind(ref: number): "map" | "seq" | "scalar" {
    if (ref >= 0) return "scalar";
    return (this.pool[-ref - 1]! & 3) === SEQ ? "seq" : "map";
  }

  /** Number of entries or items of a collection. */
  count(ref: number): number {
    return ref >= 0 ? 0 : this.pool[-ref - 1]! >>> 2;
  }

  /** Where the node starts (the library's `range[0]`). */
  start(ref: number): number {
    return ref >= 0 ? ref : this.pool[-ref]!;
  }

  /** The index of the entry with this key in a mapping, or -1. */
  entry(map: number, key: string): number {
    const base = -map - 1;
    const n = this.pool[base]! >>> 2;
    const flow = (this.pool[base]! & 3) === FLOW_MAP;
    this.keyReader ??= new Reader(this.text, 0, false);
    const r = this.keyReader;
    if (n <= 8) {
      for (let i = 0; i < n; i++) if (r.keyAt(this.pool[base + 2 + 2 * i]!, flow) === key) return i;
      return -1;
    }
    let index = this.keyIndex.get(base);
    if (!index) {
      index = new Map();
      for (let i = 0; i < n; i++) index.set(r.keyAt(this.pool[base + 2 + 2 * i]!, flow), i);
      this.keyIndex.set(base, index);
    }
    return index.get(key) ?? -1;
  }

  /** Where the key of entry `i` of a mapping starts. */
  keyStart(map: number, i: number): number {
    return this.pool[-map + 1 + 2 * i]!;
  }

  /** The value of entry `i` of a mapping. */
  value(map: number, i: number): number {
    return this.pool[-map + 2 + 2 * i]!;
  }

  /** Item `i` of a list. */
  item(seq: number, i: number): number {
    return this.pool[-seq + 1 + i]!;
  }

  /** 1-based line and column (in UTF-16 code units) of an offset, as the library's LineCounter.linePos gives them. */
  linePos(offset: number): { line: number; col: number } {
    const starts = (this.lineStarts ??= lineStartsOf(this.text));
    let lo = 0;
    let hi = starts.length - 1;
    // the last line that starts at or before the offset
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (starts[mid]! <= offset) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo + 1, col: offset - starts[lo]! + 1 };
  }
}

/** Offsets at which the lines of a text start: 0 and after every LF. */
function lineStartsOf(s: string): Int32Array {
  let n = 1;
  for (let i = s.indexOf("\n"); i >= 0; i = s.indexOf("\n", i + 1)) n++;
  const starts = new Int32Array(n);
  let k = 1;
  for (let i = s.indexOf("\n"); i >= 0; i = s.indexOf("\n", i + 1)) starts[k++] = i + 1;
  return starts;
}

class Reader {
  private pos = 0;
  /** Indent of the content line `pos` is on after nextLine(); -1 at the end of the text. */
  private ind = -1;
  private depth = 0;
  /** Open flow collections, and the closing bracket of the outermost one. */
  private flowDepth = 0;
  private outerClose = 0;
  private readonly n: number;
  /**
   * Positions (see FastPositions for the layout). Every node sets `ref` as it ends: its offset
   * when it is a scalar, `-(base + 1)` when it is a collection whose record starts at `pool[base]`.
   * A collection collects its record on the `open` stack (its children's records are pushed
   * above it and moved out as they end) and moves it to `pool` when it ends, so that every
   * record is contiguous.
   */
  ref = 0;
  pool: Int32Array;
  poolLen = 0;
  private open = new Int32Array(256);
  private openLen = 0;

  constructor(
    private readonly s: string,
    private readonly maxDepth: number,
    records = true,
  ) {
    this.n = s.length;
    // a plan in block and flow style needs a little more than one number per 8 characters
    this.pool = new Int32Array(records ? Math.max(64, this.n >> 3) : 0);
  }

  private push(v: number): void {
    if (this.openLen === this.open.length) this.growOpen();
    this.open[this.openLen++] = v;
  }

  /** Two numbers at once: a mapping entry, or a record's header and start. */
  private push2(a: number, b: number): void {
    if (this.openLen + 2 > this.open.length) this.growOpen();
    const o = this.open;
    const i = this.openLen;
    o[i] = a;
    o[i + 1] = b;
    this.openLen = i + 2;
  }

  private growOpen(): void {
    const o = new Int32Array(this.open.length * 2);
    o.set(this.open);
    this.open = o;
  }

  /** Start the record of a collection that starts at `offset`; returns its mark on the stack. */
  private openRecord(offset: number): number {
    const mark = this.openLen;
    this.push2(0, offset);
    return mark;
  }

  /** Move the record opened at `mark` to the pool, with its header; sets `ref` to it. */
  private closeRecord(mark: number, kind: number, count: number): void {
    const len = this.openLen - mark;
    this.open[mark] = count * 4 + kind;
    if (this.poolLen + len > this.pool.length) {
      const p = new Int32Array(Math.max(Math.ceil(this.pool.length * 1.5), this.poolLen + len));
      p.set(this.pool.subarray(0, this.poolLen));
      this.pool = p;
    }
    const base = this.poolLen;
    const pool = this.pool;
    const open = this.open;
    if (len <= 16) for (let i = 0; i < len; i++) pool[base + i] = open[mark + i]!;
    else pool.set(open.subarray(mark, this.openLen), base);
    this.poolLen += len;
    this.openLen = mark;
    this.ref = -(base + 1);
  }

  document(): unknown {
    const s = this.s;
    let ind = this.nextLine(true);
    if (ind < 0) bail(); // only comments: the caller reports an empty file
    if (ind === 0 && s.startsWith("---", this.pos)) {
      this.pos += 3;
      const c = s.charCodeAt(this.pos);
      if (this.pos < this.n && c !== SP && c !== LF) bail();
      this.endLine();
      ind = this.nextLine(false);
      if (ind < 0) bail();
    }
    const v = this.blockNode(ind, -1);
    if (this.ind !== -1) bail();
    return v;
  }

  /**
   * From the start of a line, skip blank and comment lines; leave `pos` at the first character of
   * the next content line and return its indent, or -1 at the end. A document marker bails (a
   * second document, or a marker where this subset does not expect one).
   */
  private nextLine(markerOk: boolean): number {
    const s = this.s;
    const n = this.n;
    let p = this.pos;
    for (;;) {
      const ls = p;
      while (p < n && s.charCodeAt(p) === SP) p++;
      if (p >= n) {
        this.pos = n;
        return (this.ind = -1);
      }
      const c = s.charCodeAt(p);
      if (c === LF) {
        p++;
        continue;
      }
      if (c === HASH) {
        const e = s.indexOf("\n", p);
        p = e < 0 ? n : e + 1;
        continue;
      }
      const ind = p - ls;
      if (ind === 0 && !markerOk && (s.startsWith("---", p) || s.startsWith("...", p))) bail();
      if (ind === 0 && markerOk && s.startsWith("...", p)) bail();
      this.pos = p;
      return (this.ind = ind);
    }
  }

  /** After a value on its line: spaces, an optional comment, then the line end (or the end of the text). */
  private endLine(): void {
    const s = this.s;
    let p = this.pos;
    while (p < this.n && s.charCodeAt(p) === SP) p++;
    if (p >= this.n) {
      this.pos = this.n;
      return;
    }
    const c = s.charCodeAt(p);
    if (c === LF) {
      this.pos = p + 1;
      return;
    }
    // a comment needs white space before it
    if (c === HASH && p > this.pos) {
      const e = s.indexOf("\n", p);
      this.pos = e < 0 ? this.n : e + 1;
      return;
    }
    bail();
  }

  /** End of a one-line value: finish the line, find the next one, and refuse a continuation. */
  private afterInline(parentIndent: number): void {
    this.endLine();
    if (this.nextLine(false) > parentIndent) bail();
  }

  private enter(): void {
    if (++this.depth > this.maxDepth) bail();
  }

  /** A block node whose first character is at `pos`, in column `col`, inside a collection at `parentIndent`. */
  private blockNode(col: number, parentIndent: number): unknown {
    const s = this.s;
    const c = s.charCodeAt(this.pos);
    if (c === DASH && this.isSeqIndicator(this.pos)) return this.blockSeq(col);
    if (c === LBRACKET || c === LBRACE) {
      const v = this.flowValue(parentIndent + 1);
      const p = this.skipSpaces(this.pos);
      if (s.charCodeAt(p) === COLON) bail(); // a flow collection as a key
      this.afterInline(parentIndent);
      return v;
    }
    // a scalar, or the first key of a mapping
    const start = this.pos;
    let text: string;
    if (c === DQUOTE) text = this.doubleQuoted();
    else if (c === SQUOTE) text = this.singleQuoted();
    else {
      const end = this.plainBlock();
      if (s.charCodeAt(this.pos) === COLON) {
        this.pos = start;
        return this.blockMap(col);
      }
      const v = resolvePlain(s.slice(start, end));
      this.afterInline(parentIndent);
      this.ref = start;
      return v;
    }
    if (s.charCodeAt(this.pos) === COLON) {
      this.pos = start;
      return this.blockMap(col);
    }
    this.afterInline(parentIndent);
    this.ref = start;
    return text;
  }

  /** `-` followed by a space or a line end. */
  private isSeqIndicator(p: number): boolean {
    const c = this.s.charCodeAt(p + 1);
    return p + 1 >= this.n || c === SP || c === LF;
  }

  private skipSpaces(p: number): number {
    while (p < this.n && this.s.charCodeAt(p) === SP) p++;
    return p;
  }

  private blockSeq(col: number): unknown[] {
    this.enter();
    const s = this.s;
    const out: unknown[] = [];
    const mark = this.openRecord(this.pos);
    for (;;) {
      // `pos` is on a `-` in column `col`
      this.pos++;
      const p = this.skipSpaces(this.pos);
      const c = s.charCodeAt(p);
      if (p >= this.n || c === LF || c === HASH) {
        this.endLine();
        const ind = this.nextLine(false);
        if (ind > col) out.push(this.blockNode(ind, col));
        else {
          out.push(null);
          this.ref = p; // the library puts an empty item just past the spaces after its '-'
        }
      } else {
        // the '-' is in column `col`; `this.pos` is just past it
        const at = col + 1 + (p - this.pos);
        this.pos = p;
        out.push(this.blockNode(at, col));
      }
      this.push(this.ref);
      const ind = this.ind;
      if (ind === col && s.charCodeAt(this.pos) === DASH && this.isSeqIndicator(this.pos)) continue;
      if (ind > col) bail();
      this.depth--;
      this.closeRecord(mark, SEQ, out.length);
      return out;
    }
  }

  private blockMap(col: number): Record<string, unknown> {
    this.enter();
    const s = this.s;
    const out: Record<string, unknown> = {};
    const mark = this.openRecord(this.pos);
    let count = 0;
    for (;;) {
      // `pos` is on a key in column `col`
      const keyAt = this.pos;
      const key = this.blockKey();
      if (Object.prototype.hasOwnProperty.call(out, key)) bail();
      // past the ':'; it is followed by a space or the line end
      const p = this.skipSpaces(this.pos);
      const c = s.charCodeAt(p);
      let v: unknown;
      if (p >= this.n || c === LF || c === HASH) {
        this.endLine();
        const ind = this.nextLine(false);
        if (ind > col) v = this.blockNode(ind, col);
        else if (ind === col && s.charCodeAt(this.pos) === DASH && this.isSeqIndicator(this.pos)) v = this.blockSeq(col);
        else {
          v = null;
          this.ref = p; // the library puts an empty value just past the spaces after its ':'
        }
      } else {
        this.pos = p;
        v = this.inlineValue(col);
      }
      out[key] = v;
      this.push2(keyAt, this.ref);
      count++;
      const ind = this.ind;
      if (ind === col) continue;
      if (ind > col) bail();
      this.depth--;
      this.closeRecord(mark, BLOCK_MAP, count);
      return out;
    }
  }

  /** A mapping key and its `:` (which must be followed by a space or the line end). */
  /** The key of a recorded entry, read again from its offset (which once read as a key). */
  keyAt(offset: number, flow: boolean): string {
    const s = this.s;
    this.pos = offset;
    const c = s.charCodeAt(offset);
    if (c === DQUOTE) return this.doubleQuoted();
    if (c === SQUOTE) return this.singleQuoted();
    const end = flow ? this.plainFlow() : this.plainBlock();
    return resolvePlain(s.slice(offset, end)) as string;
  }

  private blockKey(): string {
    const s = this.s;
    const start = this.pos;
    const c = s.charCodeAt(start);
    let key: string;
    if (c === DQUOTE) key = this.doubleQuoted();
    else if (c === SQUOTE) key = this.singleQuoted();
    else {
      const end = this.plainBlock();
      if (end !== this.pos) bail(); // no colon, or a space before it
      const k = resolvePlain(s.slice(start, end));
      if (typeof k !== "string") bail();
      key = k;
    }
    if (s.charCodeAt(this.pos) !== COLON || this.pos - start > MAX_KEY) bail();
    const next = s.charCodeAt(this.pos + 1);
    if (this.pos + 1 < this.n && next !== SP && next !== LF) bail();
    this.pos++;
    checkKey(key);
    return key;
  }

  /** A value on the line of its key: a flow collection, a quoted or a plain scalar. */
  private inlineValue(parentIndent: number): unknown {
    const s = this.s;
    const c = s.charCodeAt(this.pos);
    const start = this.pos;
    let v: unknown;
    if (c === LBRACKET || c === LBRACE) v = this.flowValue(parentIndent + 1);
    else {
      if (c === DQUOTE) v = this.doubleQuoted();
      else if (c === SQUOTE) v = this.singleQuoted();
      else {
        const end = this.plainBlock();
        if (s.charCodeAt(this.pos) === COLON) bail(); // a mapping inside a compact value
        v = resolvePlain(s.slice(start, end));
      }
      this.ref = start;
    }
    if (s.charCodeAt(this.skipSpaces(this.pos)) === COLON) bail();
    this.afterInline(parentIndent);
    return v;
  }

  /**
   * A plain scalar in block context, from `pos`. Returns the end of its text (trailing spaces
   * dropped) and leaves `pos` on what stopped it: a ':' indicator, the space before a comment,
   * or the line end.
   */
  private plainBlock(): number {
    const s = this.s;
    const n = this.n;
    let i = this.pos;
    this.plainStart(i, false);
    let end = i;
    while (i < n) {
      const c = s.charCodeAt(i);
      if (c === LF) break;
      if (c === SP) {
        if (s.charCodeAt(i + 1) === HASH) break;
        i++;
        continue;
      }
      if (c === COLON) {
        const d = s.charCodeAt(i + 1);
        if (i + 1 >= n || d === SP || d === LF) break;
      }
      end = ++i;
    }
    this.pos = i;
    return end;
  }

  /** Refuse a plain scalar that starts with an indicator (or a '-' that the library might read otherwise). */
  private plainStart(i: number, inFlow: boolean): void {
    const c = this.s.charCodeAt(i);
    if (i >= this.n || c === SP || c === LF) bail();
    if (c < 128 && NOT_PLAIN_START[c] === 1) {
      if (c !== DASH) bail();
      const d = this.s.charCodeAt(i + 1);
      if (i + 1 >= this.n || d === SP || d === LF || d === HASH || (inFlow && isFlowIndicator(d))) bail();
    }
  }

  /** A single-quoted scalar on one line; `pos` ends just past the closing quote. */
  private singleQuoted(): string {
    const s = this.s;
    let i = this.pos + 1;
    let out = "";
    let from = i;
    for (;;) {
      if (i >= this.n) bail();
      const c = s.charCodeAt(i);
      if (c === LF) bail();
      if (c === SQUOTE) {
        if (s.charCodeAt(i + 1) === SQUOTE) {
          out += s.slice(from, i + 1);
          i += 2;
          from = i;
          continue;
        }
        out += s.slice(from, i);
        this.pos = i + 1;
        return out;
      }
      i++;
    }
  }

  /** A double-quoted scalar on one line with fixed escapes; `pos` ends just past the closing quote. */
  private doubleQuoted(): string {
    const s = this.s;
    let i = this.pos + 1;
    let out = "";
    let from = i;
    for (;;) {
      if (i >= this.n) bail();
      const c = s.charCodeAt(i);
      if (c === LF) bail();
      if (c === DQUOTE) {
        out += s.slice(from, i);
        this.pos = i + 1;
        return out;
      }
      if (c === BACKSLASH) {
        out += s.slice(from, i);
        const e = s[i + 1];
        if (e === undefined) bail();
        const fixed = ESCAPES[e];
        if (fixed !== undefined && Object.prototype.hasOwnProperty.call(ESCAPES, e)) {
          out += fixed;
          i += 2;
        } else if (e === "x" || e === "u" || e === "U") {
          const len = e === "x" ? 2 : e === "u" ? 4 : 8;
          const hex = s.substr(i + 2, len);
          if (hex.length !== len || !/^[0-9a-fA-F]+$/.test(hex)) bail();
          const code = parseInt(hex, 16);
          if (code > 0x10ffff) bail();
          out += String.fromCodePoint(code);
          i += 2 + len;
        } else bail();
        from = i;
        continue;
      }
      i++;
    }
  }

  // ---- flow collections

  /**
   * Skip spaces, line ends and comments inside a flow collection. Continuation lines must be
   * indented at least `minIndent` (deeper than the block collection around the flow one); the
   * library also takes the closing bracket of the outermost collection one column less.
   */
  private skipFlow(minIndent: number): void {
    const s = this.s;
    const n = this.n;
    let p = this.pos;
    for (;;) {
      if (p >= n) bail(); // an unclosed collection
      const c = s.charCodeAt(p);
      if (c === SP) p++;
      else if (c === LF) {
        p++;
        const ls = p;
        while (p < n && s.charCodeAt(p) === SP) p++;
        const d = s.charCodeAt(p);
        if (p < n && d !== LF) {
          if (p - ls < minIndent && !(p - ls === minIndent - 1 && this.flowDepth === 1 && d === this.outerClose)) bail();
          if (p === ls && (s.startsWith("---", p) || s.startsWith("...", p))) bail();
        }
      } else if (c === HASH) {
        const prev = s.charCodeAt(p - 1);
        if (prev !== SP && prev !== LF) bail();
        const e = s.indexOf("\n", p);
        p = e < 0 ? n : e;
      } else break;
    }
    this.pos = p;
  }

  /** A flow node at `pos` (white space already skipped). */
  private flowValue(minIndent: number): unknown {
    const s = this.s;
    const c = s.charCodeAt(this.pos);
    if (c === LBRACKET) return this.flowSeq(minIndent);
    if (c === LBRACE) return this.flowMap(minIndent);
    this.ref = this.pos;
    if (c === DQUOTE) return this.doubleQuoted();
    if (c === SQUOTE) return this.singleQuoted();
    const start = this.pos;
    const end = this.plainFlow();
    return resolvePlain(s.slice(start, end));
  }

  /** Like plainBlock, in flow context: flow indicators also stop it, and so does ':' before one. */
  private plainFlow(): number {
    const s = this.s;
    const n = this.n;
    let i = this.pos;
    this.plainStart(i, true);
    let end = i;
    while (i < n) {
      const c = s.charCodeAt(i);
      if (c === LF || isFlowIndicator(c)) break;
      if (c === SP) {
        if (s.charCodeAt(i + 1) === HASH) break;
        i++;
        continue;
      }
      if (c === COLON) {
        const d = s.charCodeAt(i + 1);
        if (i + 1 >= n || d === SP || d === LF || isFlowIndicator(d)) break;
      }
      end = ++i;
    }
    this.pos = i;
    return end;
  }

  private enterFlow(close: number): void {
    this.enter();
    if (++this.flowDepth === 1) this.outerClose = close;
  }

  /** Step past the closing bracket and close the record opened at `mark`. */
  private leaveFlow<T>(out: T, mark: number, kind: number, count: number): T {
    this.pos++;
    this.depth--;
    this.flowDepth--;
    this.closeRecord(mark, kind, count);
    return out;
  }

  private flowSeq(minIndent: number): unknown[] {
    this.enterFlow(RBRACKET);
    const s = this.s;
    const out: unknown[] = [];
    const mark = this.openRecord(this.pos);
    this.pos++;
    this.skipFlow(minIndent);
    if (s.charCodeAt(this.pos) === RBRACKET) return this.leaveFlow(out, mark, SEQ, 0);
    for (;;) {
      out.push(this.flowValue(minIndent));
      this.push(this.ref);
      this.skipFlow(minIndent);
      const c = s.charCodeAt(this.pos);
      if (c === COMMA) {
        this.pos++;
        this.skipFlow(minIndent);
        const d = s.charCodeAt(this.pos);
        if (d === RBRACKET) return this.leaveFlow(out, mark, SEQ, out.length); // a trailing comma is allowed
        if (d === COMMA) bail(); // an empty entry is not
        continue;
      }
      if (c === RBRACKET) return this.leaveFlow(out, mark, SEQ, out.length);
      bail(); // includes `[a: b]`, a pair inside a list
    }
  }

  private flowMap(minIndent: number): Record<string, unknown> {
    this.enterFlow(RBRACE);
    const s = this.s;
    const out: Record<string, unknown> = {};
    const mark = this.openRecord(this.pos);
    let count = 0;
    this.pos++;
    this.skipFlow(minIndent);
    if (s.charCodeAt(this.pos) === RBRACE) return this.leaveFlow(out, mark, FLOW_MAP, 0);
    for (;;) {
      const start = this.pos;
      const c = s.charCodeAt(start);
      let key: string;
      let quoted = true;
      if (c === DQUOTE) key = this.doubleQuoted();
      else if (c === SQUOTE) key = this.singleQuoted();
      else {
        quoted = false;
        const end = this.plainFlow();
        if (end !== this.pos) bail(); // no colon right after the key
        const k = resolvePlain(s.slice(start, end));
        if (typeof k !== "string") bail();
        key = k;
      }
      if (s.charCodeAt(this.pos) !== COLON || this.pos - start > MAX_KEY) bail();
      this.pos++;
      // after a plain key the ':' needs white space; after a quoted (JSON-like) key it need not
      const d = s.charCodeAt(this.pos);
      if (!quoted && d !== SP && d !== LF) bail();
      checkKey(key);
      if (Object.prototype.hasOwnProperty.call(out, key)) bail();
      this.skipFlow(minIndent);
      const e = s.charCodeAt(this.pos);
      if (e === COMMA || e === RBRACE || e === COLON) bail(); // an empty value
      out[key] = this.flowValue(minIndent);
      this.push2(start, this.ref);
      count++;
      this.skipFlow(minIndent);
      const f = s.charCodeAt(this.pos);
      if (f === COMMA) {
        this.pos++;
        this.skipFlow(minIndent);
        const g = s.charCodeAt(this.pos);
        if (g === RBRACE) return this.leaveFlow(out, mark, FLOW_MAP, count);
        if (g === COMMA) bail();
        continue;
      }
      if (f === RBRACE) return this.leaveFlow(out, mark, FLOW_MAP, count);
      bail();
    }
  }
}

/** Keys the plain-object result cannot hold as written, or that mean more than a name. */
function checkKey(key: string): void {
  if (key === "__proto__" || key === "<<") bail();
}
