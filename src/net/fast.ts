/**
 * Bulk-path address text: parsing IPv6 text straight from bytes (a slice of a file) into four
 * 32-bit words, without making a string. It accepts exactly what `parseWordsInto` in text.ts
 * accepts (tests cross-check both against ip-address); the text path stays the reference.
 */

const groups = new Int32Array(10);
const full = new Int32Array(8);

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
    let digits = 0;
    const from = i;
    while (i < end) {
      const c = buf[i]!;
      let d: number;
      if (c >= 48 && c <= 57) d = c - 48;
      else if (c >= 97 && c <= 102) d = c - 87;
      else if (c >= 65 && c <= 70) d = c - 55;
      else break;
      v = (v << 4) | d;
      digits++;
      i++;
    }
    if (i < end && buf[i] === 46 /* . */) {
      // dotted-quad tail: must be last and fill two groups
      const v4 = parseV4Bytes(buf, from, end);
      if (v4 < 0 || count > 6) return false;
      groups[count++] = v4 >>> 16;
      groups[count++] = v4 & 0xffff;
      i = end;
      break;
    }
    if (digits === 0 || digits > 4) return false;
    if (count >= 8) return false;
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
  if (gap < 0) {
    if (count !== 8) return false;
    for (let k = 0; k < 8; k++) full[k] = groups[k]!;
  } else {
    if (count > 7) return false;
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
