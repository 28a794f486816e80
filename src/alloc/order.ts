/**
 * Value orders for one level of the node hierarchy, after RFC 3531: leftmost, centremost and
 * rightmost bit assignment keep free bits next to each boundary so that it can move later.
 */
import type { LevelOrder } from "../plan/model.js";

/**
 * The order in which bit positions (0 = most significant of the field) are switched on.
 * - rightmost / sequential: from the least significant bit (plain counting);
 * - leftmost: from the most significant bit (mirrored counting);
 * - centremost: from the bit just after the centre, then alternately the one before and the
 *   one after the bits used so far (RFC 3531 §3).
 */
export function bitOrder(order: LevelOrder, width: number): number[] {
  const out: number[] = [];
  if (order === "leftmost") for (let i = 0; i < width; i++) out.push(i);
  else if (order === "centremost") {
    const first = Math.floor(width / 2);
    out.push(first);
    for (let d = 1; out.length < width; d++) {
      if (first - d >= 0) out.push(first - d);
      if (first + d < width) out.push(first + d);
    }
  } else for (let i = width - 1; i >= 0; i--) out.push(i);
  return out;
}

/**
 * The k-th value (k from 0) of a `width`-bit field in the given order. Every value 0..2^width-1
 * appears exactly once as k runs over 0..2^width-1.
 */
export function nthValue(order: LevelOrder, width: number, k: bigint, bits: readonly number[] = bitOrder(order, width)): bigint {
  if (order === "sequential" || order === "rightmost") return k;
  let v = 0n;
  for (let i = 0; k > 0n; i++, k >>= 1n) {
    if (k & 1n) v |= 1n << BigInt(width - 1 - bits[i]!);
  }
  return v;
}

/** The rank of value v in the order (inverse of nthValue). */
export function rankOf(order: LevelOrder, width: number, v: bigint, bits: readonly number[] = bitOrder(order, width)): bigint {
  if (order === "sequential" || order === "rightmost") return v;
  let k = 0n;
  for (let i = 0; i < width; i++) {
    if ((v >> BigInt(width - 1 - bits[i]!)) & 1n) k |= 1n << BigInt(i);
  }
  return k;
}
