/**
 * What a lock holds, and the small value helpers both lock readers share (lock.ts, the readable
 * reader and the writer; lock-fast.ts, the fast reader). Kept apart so that neither reader
 * imports the other for them.
 */

export const LOCK_SCHEMA_ID = "sidcarve/lock/v1";

/** A value no longer in use; it stays out of circulation until released. */
export interface RetiredValue {
  readonly kind: "group" | "node" | "function";
  /** The space the value lives in: parent group path, place, or `owner|algorithm`. */
  readonly space: string;
  readonly value: bigint;
  /** What held it (group path, node name, SID key). */
  readonly was: string;
}

export interface Lock {
  readonly plan: string;
  /** Fingerprint of the bit layout (levels and blocks); a change means every locator moves. */
  readonly layout: string;
  readonly groups: ReadonlyMap<string, bigint>;
  readonly nodes: ReadonlyMap<string, { place: string; value: bigint }>;
  /** owner (node name or `anycast:NAME`) -> SID key -> function value */
  readonly functions: ReadonlyMap<string, ReadonlyMap<string, bigint>>;
  readonly retired: readonly RetiredValue[];
}

const SMALL_VALUES: bigint[] = [];
const SMALL_LIMIT = 1 << 16;

/** The value of a lower-case hex digit's character code (the only digits a lock holds), or -1. */
export function hexDigit(c: number): number {
  return c >= 0x30 && c <= 0x39 ? c - 0x30 : c >= 0x61 && c <= 0x66 ? c - 0x57 : -1;
}

/** BigInt(n) for a safe integer n >= 0, shared for the small values. */
export function smallBigInt(n: number): bigint {
  if (n < SMALL_LIMIT) return (SMALL_VALUES[n] ??= BigInt(n));
  return BigInt(n);
}
