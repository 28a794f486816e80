/**
 * The address text core: IPv6 text read from character codes (the bytes of a file, or a string's
 * codes copied by text.ts) into four 32-bit words, without making a string or a bigint. text.ts
 * (`parseWordsInto`, `parseAddr`) is the string edge of this same code; tests check both against
 * a readable grammar of RFC 4291 text and against ip-address.
 */

const groups = new Int32Array(10);

/** Value of each byte as a hex digit (either case), -1 when it is none. */
export const HEX_DIGIT: Readonly<Int8Array> = (() => {
  const t = new Int8Array(256).fill(-1);
  for (let c = 0; c < 10; c++) t[48 + c] = c;
  for (let c = 0; c < 6; c++) t[65 + c] = t[97 + c] = 10 + c;
  return t;
})();

/**
 * Parse the ASCII bytes `buf[start..end)` as one IPv6 address (every RFC 4291 §2.2 text form:
 * upper or lower case hex, `::`, a dotted-quad tail) into `out[at..at+3]`, most significant word
 * first. Returns false for anything else, including surrounding spaces, a zone id, brackets or a
 * prefix length; `out` is then left in an unspecified state. Allocates nothing.
 */
export function parseWordsBytes(buf: Uint8Array, start: number, end: number, out: Uint32Array, at: number): boolean {
  const n = end - start;
  if (n < 2 || n > 45) return false;
  let count = 0;
  let gap = -1;
  let i = start;
  if (buf[i] === 58 /* : */) {
    if (buf[i + 1] !== 58) return false;
    gap = 0;
    i += 2;
    if (i === end) {
      out[at] = out[at + 1] = out[at + 2] = out[at + 3] = 0;
      return true;
    }
  }
  while (i < end) {
    let v = 0;
    const from = i;
    for (let d: number; i < end && (d = HEX_DIGIT[buf[i]!]!) >= 0; i++) v = (v << 4) | d;
    if (i < end && buf[i] === 46 /* . */) {
      // dotted-quad tail: must be last and fill two groups
      const v4 = parseV4Bytes(buf, from, end);
      if (v4 < 0 || count > 6) return false;
      groups[count++] = v4 >>> 16;
      groups[count++] = v4 & 0xffff;
      break;
    }
    const digits = i - from;
    if (digits === 0 || digits > 4 || count >= 8) return false;
    groups[count++] = v;
    if (i === end) break;
    if (buf[i] !== 58) return false;
    i++;
    if (i < end && buf[i] === 58) {
      if (gap >= 0) return false; // a second "::"
      gap = count;
      i++;
      if (i === end) break;
    } else if (i === end) return false; // a trailing single ':'
  }
  if (gap < 0 ? count !== 8 : count > 7) return false;
  // group g of the address: written before the gap, zero inside it, written after it
  const zeros = gap < 0 ? 0 : 8 - count;
  const after = gap < 0 ? 8 : gap + zeros;
  for (let w = 0; w < 4; w++) {
    const g = 2 * w;
    const hi = g < after ? (gap < 0 || g < gap ? groups[g]! : 0) : groups[g - zeros]!;
    const lo = g + 1 < after ? (gap < 0 || g + 1 < gap ? groups[g + 1]! : 0) : groups[g + 1 - zeros]!;
    out[at + w] = ((hi << 16) | lo) >>> 0;
  }
  return true;
}

/** A dotted quad from `start` to exactly `end` (no leading zeros, each part 0..255), or -1. */
function parseV4Bytes(buf: Uint8Array, start: number, end: number): number {
  let value = 0;
  let parts = 0;
  let i = start;
  while (parts < 4) {
    let v = 0;
    let digits = 0;
    const from = i;
    while (i < end) {
      const c = buf[i]!;
      if (c < 48 || c > 57) break;
      v = v * 10 + (c - 48);
      digits++;
      i++;
    }
    if (digits === 0 || digits > 3 || v > 255) return -1;
    if (digits > 1 && buf[from] === 48) return -1; // no leading zeros in a dotted quad
    value = value * 256 + v;
    parts++;
    if (parts < 4) {
      if (i >= end || buf[i] !== 46) return -1;
      i++;
    }
  }
  return i === end ? value >>> 0 : -1;
}

/**
 * Parse `buf[start..end)` as `address/length` (length 1 to 3 ASCII digits, 0..128; host bits
 * kept) into `out[at..at+3]`; returns the length, or -1 for anything else, including any space.
 * Where it succeeds, `parsePrefixParts` (text.ts) gives the same value; where it fails, that
 * function is the one to ask, for its answer and its reason. Allocates nothing.
 */
export function parsePrefixBytes(buf: Uint8Array, start: number, end: number, out: Uint32Array, at: number): number {
  let slash = start;
  while (slash < end && buf[slash] !== 47 /* / */) slash++;
  const digits = end - slash - 1;
  if (digits < 1 || digits > 3) return -1;
  let len = 0;
  for (let k = slash + 1; k < end; k++) {
    const c = buf[k]!;
    if (c < 48 || c > 57) return -1;
    len = len * 10 + (c - 48);
  }
  if (len > 128) return -1;
  return parseWordsBytes(buf, start, slash, out, at) ? len : -1;
}
