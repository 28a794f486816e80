/**
 * 128-bit unsigned arithmetic on IPv6 addresses held as `bigint`.
 *
 * Bit numbering, stated once for the whole project: bit 0 is the most significant bit of the
 * address (the first bit on the wire), bit 127 the least significant. A field "at offset o of
 * width w" therefore occupies bits o .. o+w-1 and is worth `(addr >> (128 - o - w)) & (2^w - 1)`.
 */

/** An IPv6 address: an integer in 0 .. 2^128-1. */
export type Addr = bigint;

/** 2^128 - 1, the all-ones address. */
export const ALL_ONES: Addr = (1n << 128n) - 1n;

/** True when `x` is an integer in the 128-bit range. */
export function isAddr(x: bigint): boolean {
  return x >= 0n && x <= ALL_ONES;
}

/** Mask with the leading `len` bits set (len 0..128). */
export function prefixMask(len: number): Addr {
  if (len <= 0) return 0n;
  if (len >= 128) return ALL_ONES;
  return ALL_ONES ^ ((1n << BigInt(128 - len)) - 1n);
}

/** Mask with the trailing `128 - len` bits set: the host part of a /len. */
export function hostMask(len: number): Addr {
  return ALL_ONES ^ prefixMask(len);
}

/**
 * The `width`-bit field at `offset` (bit 0 = most significant).
 * Edge cases: width 0 gives 0n; offset + width must be <= 128 (programmer error otherwise).
 */
export function getField(addr: Addr, offset: number, width: number): bigint {
  if (width === 0) return 0n;
  if (offset < 0 || width < 0 || offset + width > 128) throw new RangeError(`field ${offset}+${width} exceeds 128 bits`);
  return (addr >> BigInt(128 - offset - width)) & ((1n << BigInt(width)) - 1n);
}

/**
 * `addr` with the `width`-bit field at `offset` replaced by `value`.
 * Throws RangeError (programmer error) when the value does not fit the width.
 */
export function setField(addr: Addr, offset: number, width: number, value: bigint): Addr {
  if (width === 0) {
    if (value !== 0n) throw new RangeError("value does not fit a 0-bit field");
    return addr;
  }
  if (offset < 0 || width < 0 || offset + width > 128) throw new RangeError(`field ${offset}+${width} exceeds 128 bits`);
  const max = (1n << BigInt(width)) - 1n;
  if (value < 0n || value > max) throw new RangeError(`value ${value} does not fit ${width} bits`);
  const shift = BigInt(128 - offset - width);
  return (addr & ~(max << shift) & ALL_ONES) | (value << shift);
}

/** Number of leading bits two addresses share (128 when equal). */
export function commonPrefixLength(a: Addr, b: Addr): number {
  const x = a ^ b;
  if (x === 0n) return 128;
  return 128 - x.toString(2).length;
}

/** Split into four 32-bit words, most significant first (for packed bulk storage). */
export function toWords(a: Addr): [number, number, number, number] {
  return [
    Number((a >> 96n) & 0xffffffffn),
    Number((a >> 64n) & 0xffffffffn),
    Number((a >> 32n) & 0xffffffffn),
    Number(a & 0xffffffffn),
  ];
}

/** Four 32-bit words seen as two 64-bit halves (fromWords and wordsInto pass two bigints instead of four). */
const halves = new BigUint64Array(2);
const quarters = new Uint32Array(halves.buffer);
const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
// halves[0] holds bits 127..64, halves[1] bits 63..0; where each 32-bit word lands depends on byte order
const Q0 = LITTLE_ENDIAN ? 1 : 0;
const Q1 = LITTLE_ENDIAN ? 0 : 1;
const Q2 = LITTLE_ENDIAN ? 3 : 2;
const Q3 = LITTLE_ENDIAN ? 2 : 3;

/** Inverse of toWords: `(w0 << 96) | (w1 << 64) | (w2 << 32) | w3`, each word taken as unsigned (tests check it against that expression). */
export function fromWords(w0: number, w1: number, w2: number, w3: number): Addr {
  quarters[Q0] = w0;
  quarters[Q1] = w1;
  quarters[Q2] = w2;
  quarters[Q3] = w3;
  return (halves[0]! << 64n) | halves[1]!;
}

/** toWords into `out` (the low 128 bits of `a`, most significant word first), through the two halves: no bigint is made. */
export function wordsInto(a: Addr, out: Uint32Array): void {
  halves[0] = a >> 64n;
  halves[1] = a;
  out[0] = quarters[Q0]!;
  out[1] = quarters[Q1]!;
  out[2] = quarters[Q2]!;
  out[3] = quarters[Q3]!;
}
