/**
 * The text edge of the address core: parse RFC 4291 text into 128-bit values and print them in
 * RFC 5952 canonical form. The hand-written fast paths are checked against `ip-address` in tests;
 * `ip-address` also supplies the explanation when a string is rejected.
 */
import { Address6 } from "ip-address";
import { parseWordsBytes } from "./fast.js";
import type { Addr } from "./uint128.js";

/** Result of parsing: the value, or a plain reason quoting what was wrong. */
export type ParseResult<T> = { ok: true; value: T } | { ok: false; reason: string };

/** ASCII codes of the hex digits, lower case. */
const HEX_CODES = Uint8Array.from("0123456789abcdef", (c) => c.charCodeAt(0));
/** The eight groups of the address at hand (formatWordsInto is not re-entrant; it need not be). */
const groups = new Uint16Array(8);
/** Where formatWords has formatWordsInto write (the longest text, ::ffff:255.255.255.255 or eight full groups, is 39 bytes). */
const textScratch = Buffer.alloc(48);

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

/**
 * RFC 5952 text from four 32-bit words (most significant first); the packed fast path. The text
 * is formatWordsInto's bytes (one implementation of the rules for both).
 */
export function formatWords(w0: number, w1: number, w2: number, w3: number): string {
  return textScratch.toString("latin1", 0, formatWordsInto(textScratch, 0, w0, w1, w2, w3));
}

/**
 * Write the RFC 5952 text of the address with words w0..w3 (most significant first; unsigned or
 * signed 32-bit) as ASCII into `buf` at `pos`; returns the position after it. The caller leaves
 * room: the text is at most 39 bytes. Allocates nothing.
 */
export function formatWordsInto(buf: Uint8Array, pos: number, w0: number, w1: number, w2: number, w3: number): number {
  let p = pos;
  // IPv4-mapped ::ffff:a.b.c.d (RFC 5952 §5)
  if (w0 === 0 && w1 === 0 && w2 === 0xffff) {
    buf[p++] = 0x3a;
    buf[p++] = 0x3a;
    buf[p++] = 0x66;
    buf[p++] = 0x66;
    buf[p++] = 0x66;
    buf[p++] = 0x66;
    buf[p++] = 0x3a;
    p = octetInto(buf, p, w3 >>> 24);
    buf[p++] = 0x2e;
    p = octetInto(buf, p, (w3 >>> 16) & 255);
    buf[p++] = 0x2e;
    p = octetInto(buf, p, (w3 >>> 8) & 255);
    buf[p++] = 0x2e;
    return octetInto(buf, p, w3 & 255);
  }
  const g = groups; // a Uint16Array keeps the low 16 bits of what is stored
  g[0] = w0 >>> 16;
  g[1] = w0;
  g[2] = w1 >>> 16;
  g[3] = w1;
  g[4] = w2 >>> 16;
  g[5] = w2;
  g[6] = w3 >>> 16;
  g[7] = w3;
  let bestStart = -1;
  let bestLen = 1; // a single zero group is never compressed (RFC 5952 §4.2.2)
  for (let i = 0; i < 8; ) {
    if (g[i] === 0) {
      let j = i + 1;
      while (j < 8 && g[j] === 0) j++;
      if (j - i > bestLen) {
        bestStart = i;
        bestLen = j - i;
      }
      i = j;
    } else i++;
  }
  const bestEnd = bestStart + bestLen;
  for (let i = 0; i < 8; i++) {
    if (i === bestStart) {
      buf[p++] = 0x3a;
      buf[p++] = 0x3a;
      i = bestEnd - 1;
      continue;
    }
    if (i > 0 && i !== bestEnd) buf[p++] = 0x3a; // no ':' right after "::"
    const v = g[i]!;
    if (v >= 0x1000) buf[p++] = HEX_CODES[v >>> 12]!;
    if (v >= 0x100) buf[p++] = HEX_CODES[(v >>> 8) & 15]!;
    if (v >= 0x10) buf[p++] = HEX_CODES[(v >>> 4) & 15]!;
    buf[p++] = HEX_CODES[v & 15]!;
  }
  return p;
}

/** One octet (0..255) in decimal without leading zeros. */
function octetInto(buf: Uint8Array, p: number, v: number): number {
  if (v >= 100) {
    buf[p++] = 0x30 + ((v / 100) | 0);
    v %= 100;
    buf[p++] = 0x30 + ((v / 10) | 0);
  } else if (v >= 10) buf[p++] = 0x30 + ((v / 10) | 0);
  buf[p++] = 0x30 + (v % 10);
  return p;
}

/** Fully expanded text (eight groups of four hex digits), as used in reverse-DNS work. */
export function formatAddrExpanded(a: Addr): string {
  return a.toString(16).padStart(32, "0").replace(/(.{4})(?!$)/g, "$1:");
}

/**
 * Parse one IPv6 address into its 128-bit value, writing the result into `out` as four 32-bit
 * words. Accepts every RFC 4291 §2.2 text form (upper or lower case, `::`, a dotted-quad tail);
 * rejects zone ids, brackets, prefixes, IPv4 alone, surrounding spaces and anything else. Returns
 * false on failure. The string edge of `parseWordsBytes` (fast.ts): the codes go through the
 * same code as a file's bytes do. Allocates nothing.
 */
export function parseWordsInto(s: string, out: Uint32Array, at: number): boolean {
  const n = s.length;
  if (n < 2 || n > codes.length) return false;
  for (let k = 0; k < n; k++) {
    const c = s.charCodeAt(k);
    if (c > 127) return false; // never part of address text (and would not fit a byte)
    codes[k] = c;
  }
  return parseWordsBytes(codes, 0, n, out, at);
}

/** The codes of the string at hand (address text is at most 45 characters). */
const codes = new Uint8Array(45);
const words = new Uint32Array(4);

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
