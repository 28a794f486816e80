/**
 * The text edge of the address core: parse RFC 4291 text into 128-bit values and print them in
 * RFC 5952 canonical form. The hand-written fast paths are checked against `ip-address` in tests;
 * `ip-address` also supplies the explanation when a string is rejected.
 */
import { Address6 } from "ip-address";
import type { Addr } from "./uint128.js";

/** Result of parsing: the value, or a plain reason quoting what was wrong. */
export type ParseResult<T> = { ok: true; value: T } | { ok: false; reason: string };

const HEX = "0123456789abcdef";

/**
 * RFC 5952 canonical text: lowercase, no leading zeros, the longest run (first on ties) of two
 * or more zero groups shown as `::`; IPv4-mapped addresses end in dotted quad (RFC 5952 §5).
 */
export function formatAddr(a: Addr): string {
  const w0 = Number((a >> 96n) & 0xffffffffn);
  const w1 = Number((a >> 64n) & 0xffffffffn);
  const w2 = Number((a >> 32n) & 0xffffffffn);
  const w3 = Number(a & 0xffffffffn);
  return formatWords(w0, w1, w2, w3);
}

/** RFC 5952 text from four 32-bit words (most significant first); the packed fast path. */
export function formatWords(w0: number, w1: number, w2: number, w3: number): string {
  const g = [w0 >>> 16, w0 & 0xffff, w1 >>> 16, w1 & 0xffff, w2 >>> 16, w2 & 0xffff, w3 >>> 16, w3 & 0xffff];
  // IPv4-mapped ::ffff:a.b.c.d (RFC 5952 §5)
  if (w0 === 0 && w1 === 0 && w2 === 0xffff) {
    return `::ffff:${w3 >>> 24}.${(w3 >>> 16) & 255}.${(w3 >>> 8) & 255}.${w3 & 255}`;
  }
  let bestStart = -1;
  let bestLen = 1; // a single zero group is never compressed (RFC 5952 §4.2.2)
  for (let i = 0; i < 8; ) {
    if (g[i] === 0) {
      let j = i;
      while (j < 8 && g[j] === 0) j++;
      if (j - i > bestLen) {
        bestStart = i;
        bestLen = j - i;
      }
      i = j;
    } else i++;
  }
  let out = "";
  for (let i = 0; i < 8; i++) {
    if (i === bestStart) {
      out += "::";
      i += bestLen - 1;
      continue;
    }
    if (out.length > 0 && !out.endsWith(":")) out += ":";
    out += hex16(g[i]!);
  }
  return out;
}

function hex16(v: number): string {
  if (v < 0x10) return HEX[v]!;
  if (v < 0x100) return HEX[v >>> 4]! + HEX[v & 15]!;
  if (v < 0x1000) return HEX[v >>> 8]! + HEX[(v >>> 4) & 15]! + HEX[v & 15]!;
  return HEX[v >>> 12]! + HEX[(v >>> 8) & 15]! + HEX[(v >>> 4) & 15]! + HEX[v & 15]!;
}

/** Fully expanded text (eight groups of four hex digits), as used in reverse-DNS work. */
export function formatAddrExpanded(a: Addr): string {
  return a.toString(16).padStart(32, "0").replace(/(.{4})(?!$)/g, "$1:");
}

/**
 * Parse one IPv6 address into its 128-bit value, writing the result into `out` as four 32-bit
 * words. Accepts every RFC 4291 §2.2 text form (upper or lower case, `::`, a dotted-quad tail);
 * rejects zone ids, brackets, prefixes, IPv4 alone and anything else. Returns false on failure.
 * This is the fast path used for bulk input; it allocates nothing.
 */
export function parseWordsInto(s: string, out: Uint32Array, at: number): boolean {
  const n = s.length;
  if (n < 2 || n > 45) return false;
  const groups = scratch;
  let count = 0;
  let gap = -1;
  let i = 0;
  if (s.charCodeAt(0) === 58 /* : */) {
    if (s.charCodeAt(1) !== 58) return false;
    gap = 0;
    i = 2;
    if (i === n) {
      out[at] = out[at + 1] = out[at + 2] = out[at + 3] = 0;
      return true;
    }
  }
  while (i < n) {
    // read one group of hex digits, or an IPv4 tail
    let v = 0;
    let digits = 0;
    const start = i;
    while (i < n) {
      const c = s.charCodeAt(i);
      let d: number;
      if (c >= 48 && c <= 57) d = c - 48;
      else if (c >= 97 && c <= 102) d = c - 87;
      else if (c >= 65 && c <= 70) d = c - 55;
      else break;
      v = (v << 4) | d;
      digits++;
      i++;
    }
    if (i < n && s.charCodeAt(i) === 46 /* . */) {
      // dotted-quad tail: must be last and occupy two groups
      const v4 = parseV4(s, start);
      if (v4 < 0 || count > 6) return false;
      groups[count++] = v4 >>> 16;
      groups[count++] = v4 & 0xffff;
      i = n;
      break;
    }
    if (digits === 0 || digits > 4) return false;
    if (count >= 8) return false;
    groups[count++] = v;
    if (i === n) break;
    if (s.charCodeAt(i) !== 58) return false;
    i++;
    if (i < n && s.charCodeAt(i) === 58) {
      if (gap >= 0) return false; // a second "::"
      gap = count;
      i++;
      if (i === n) break;
    } else if (i === n) return false; // trailing single ':'
  }
  if (gap < 0) {
    if (count !== 8) return false;
  } else if (count > 7) return false;
  // expand into eight groups
  const full = expanded;
  if (gap < 0) for (let k = 0; k < 8; k++) full[k] = groups[k]!;
  else {
    const zeros = 8 - count;
    let k = 0;
    for (let j = 0; j < gap; j++) full[k++] = groups[j]!;
    for (let j = 0; j < zeros; j++) full[k++] = 0;
    for (let j = gap; j < count; j++) full[k++] = groups[j]!;
  }
  out[at] = ((full[0]! << 16) | full[1]!) >>> 0;
  out[at + 1] = ((full[2]! << 16) | full[3]!) >>> 0;
  out[at + 2] = ((full[4]! << 16) | full[5]!) >>> 0;
  out[at + 3] = ((full[6]! << 16) | full[7]!) >>> 0;
  return true;
}

const scratch = new Array<number>(10).fill(0);
const expanded = new Array<number>(8).fill(0);
const words = new Uint32Array(4);

function parseV4(s: string, start: number): number {
  let value = 0;
  let parts = 0;
  let i = start;
  while (parts < 4) {
    let v = 0;
    let digits = 0;
    const from = i;
    while (i < s.length) {
      const c = s.charCodeAt(i);
      if (c < 48 || c > 57) break;
      v = v * 10 + (c - 48);
      digits++;
      i++;
    }
    if (digits === 0 || digits > 3 || v > 255) return -1;
    if (digits > 1 && s.charCodeAt(from) === 48) return -1; // no leading zeros in a dotted quad
    value = value * 256 + v;
    parts++;
    if (parts < 4) {
      if (s.charCodeAt(i) !== 46) return -1;
      i++;
    }
  }
  return i === s.length ? value >>> 0 : -1;
}

/**
 * Parse one IPv6 address. The reason on failure quotes the input and says what is allowed, with
 * a specific word for the usual mistakes (zone id, IPv4 address, prefix where an address is due).
 */
export function parseAddr(text: string): ParseResult<Addr> {
  const s = text.trim();
  if (parseWordsInto(s, words, 0)) {
    return {
      ok: true,
      value: (BigInt(words[0]!) << 96n) | (BigInt(words[1]!) << 64n) | (BigInt(words[2]!) << 32n) | BigInt(words[3]!),
    };
  }
  return { ok: false, reason: explainBadAddress(text) };
}

/** A plain sentence saying why `text` is not an IPv6 address. */
export function explainBadAddress(text: string): string {
  const q = JSON.stringify(text.length > 80 ? text.slice(0, 77) + "..." : text);
  const s = text.trim();
  if (s === "") return "an IPv6 address is required, got an empty string";
  if (s.includes("%")) return `${q} has a zone id (after '%'); write the address without it`;
  if (/^\d{1,3}(\.\d{1,3}){3}$/.test(s)) return `${q} is an IPv4 address; an IPv6 address is required here`;
  if (s.includes("/")) return `${q} is a prefix; a single IPv6 address is required here`;
  if (s.startsWith("[")) return `${q} has brackets; write the bare IPv6 address`;
  let detail = "";
  try {
    // ip-address gives its own reason for text it cannot read; we quote it as a detail.
    new Address6(s);
  } catch (e) {
    const m = (e as { parseMessage?: string; message?: string }).parseMessage ?? (e as Error).message;
    if (m) detail = ` (${String(m).replace(/<[^>]+>/g, "").trim()})`;
  }
  return `${q} is not an IPv6 address${detail}; expected RFC 4291 text such as 2001:db8::1`;
}

/** Parse `addr/len`; keeps host bits (see Prefix.hasHostBits). */
export function parsePrefixParts(text: string): ParseResult<{ addr: Addr; len: number }> {
  const s = text.trim();
  const q = JSON.stringify(text);
  const slash = s.indexOf("/");
  if (slash < 0) return { ok: false, reason: `${q} has no prefix length; write it as address/length, e.g. 5f00:1::/32` };
  const lenText = s.slice(slash + 1);
  if (!/^\d{1,3}$/.test(lenText) || Number(lenText) > 128) {
    return { ok: false, reason: `${q} has prefix length ${JSON.stringify(lenText)}; a whole number from 0 to 128 is allowed` };
  }
  const a = parseAddr(s.slice(0, slash));
  if (!a.ok) return a;
  return { ok: true, value: { addr: a.value, len: Number(lenText) } };
}
