/**
 * A fast reader for the subset of YAML that plans are written in: block mappings and lists,
 * flow mappings and lists (JSON included), one-line plain and quoted scalars, and comments.
 * It builds plain data directly; the yaml library's node objects cost seconds of garbage
 * collection on a large plan. It gives exactly what the library's
 * `parseDocument(text, { uniqueKeys: true, strict: true }).toJS()` gives, or `undefined` when the
 * text is outside the subset or it is not sure, so that the caller falls back to the library.
 * Bailing out is always safe; a wrong value would be a bug.
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
  if (BAD_CHARS.test(text)) return undefined;
  // Positions are never reported from here, and no scalar spans lines, so CRLF can go.
  if (text.includes("\r")) text = text.replace(/\r\n/g, "\n");
  try {
    return new Reader(text, maxDepth).document();
  } catch (e) {
    if (e === BAIL) return undefined;
    throw e;
  }
}

function bail(): never {
  throw BAIL;
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

  constructor(
    private readonly s: string,
    private readonly maxDepth: number,
  ) {
    this.n = s.length;
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
      return v;
    }
    if (s.charCodeAt(this.pos) === COLON) {
      this.pos = start;
      return this.blockMap(col);
    }
    this.afterInline(parentIndent);
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
    for (;;) {
      // `pos` is on a `-` in column `col`
      this.pos++;
      const p = this.skipSpaces(this.pos);
      const c = s.charCodeAt(p);
      if (p >= this.n || c === LF || c === HASH) {
        this.endLine();
        const ind = this.nextLine(false);
        out.push(ind > col ? this.blockNode(ind, col) : null);
      } else {
        // the '-' is in column `col`; `this.pos` is just past it
        const at = col + 1 + (p - this.pos);
        this.pos = p;
        out.push(this.blockNode(at, col));
      }
      const ind = this.ind;
      if (ind === col && s.charCodeAt(this.pos) === DASH && this.isSeqIndicator(this.pos)) continue;
      if (ind > col) bail();
      this.depth--;
      return out;
    }
  }

  private blockMap(col: number): Record<string, unknown> {
    this.enter();
    const s = this.s;
    const out: Record<string, unknown> = {};
    for (;;) {
      // `pos` is on a key in column `col`
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
        else v = null;
      } else {
        this.pos = p;
        v = this.inlineValue(col);
      }
      out[key] = v;
      const ind = this.ind;
      if (ind === col) continue;
      if (ind > col) bail();
      this.depth--;
      return out;
    }
  }

  /** A mapping key and its `:` (which must be followed by a space or the line end). */
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
    let v: unknown;
    if (c === LBRACKET || c === LBRACE) v = this.flowValue(parentIndent + 1);
    else if (c === DQUOTE) v = this.doubleQuoted();
    else if (c === SQUOTE) v = this.singleQuoted();
    else {
      const start = this.pos;
      const end = this.plainBlock();
      if (s.charCodeAt(this.pos) === COLON) bail(); // a mapping inside a compact value
      v = resolvePlain(s.slice(start, end));
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

  /** Step past the closing bracket. */
  private leaveFlow<T>(out: T): T {
    this.pos++;
    this.depth--;
    this.flowDepth--;
    return out;
  }

  private flowSeq(minIndent: number): unknown[] {
    this.enterFlow(RBRACKET);
    const s = this.s;
    const out: unknown[] = [];
    this.pos++;
    this.skipFlow(minIndent);
    if (s.charCodeAt(this.pos) === RBRACKET) return this.leaveFlow(out);
    for (;;) {
      out.push(this.flowValue(minIndent));
      this.skipFlow(minIndent);
      const c = s.charCodeAt(this.pos);
      if (c === COMMA) {
        this.pos++;
        this.skipFlow(minIndent);
        const d = s.charCodeAt(this.pos);
        if (d === RBRACKET) return this.leaveFlow(out); // a trailing comma is allowed
        if (d === COMMA) bail(); // an empty entry is not
        continue;
      }
      if (c === RBRACKET) return this.leaveFlow(out);
      bail(); // includes `[a: b]`, a pair inside a list
    }
  }

  private flowMap(minIndent: number): Record<string, unknown> {
    this.enterFlow(RBRACE);
    const s = this.s;
    const out: Record<string, unknown> = {};
    this.pos++;
    this.skipFlow(minIndent);
    if (s.charCodeAt(this.pos) === RBRACE) return this.leaveFlow(out);
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
      this.skipFlow(minIndent);
      const f = s.charCodeAt(this.pos);
      if (f === COMMA) {
        this.pos++;
        this.skipFlow(minIndent);
        const g = s.charCodeAt(this.pos);
        if (g === RBRACE) return this.leaveFlow(out);
        if (g === COMMA) bail();
        continue;
      }
      if (f === RBRACE) return this.leaveFlow(out);
      bail();
    }
  }
}

/** Keys the plain-object result cannot hold as written, or that mean more than a name. */
function checkKey(key: string): void {
  if (key === "__proto__" || key === "<<") bail();
}
