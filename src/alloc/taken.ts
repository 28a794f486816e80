/**
 * The function values taken on one locator while the allocator works on it: a set of bigints
 * with the same answers as a Set<bigint>, but kept as marks in one reused byte array when the
 * values are small (function fields of up to MARK_BITS bits, the usual case), so that a million
 * SIDs make no hash tables. Larger values (and values beyond the field) go to a Set.
 */

/** Function fields up to this many bits are marked in the byte array (2^20 bytes at most). */
export const MARK_BITS = 20;

export class TakenValues {
  private marks = new Uint8Array(0);
  private limit = 0;
  /** Marked values, to clear them at the next reset. */
  private readonly touched: number[] = [];
  private readonly others = new Set<bigint>();

  /** Start a new locator whose function field has `bits` bits, with `initial` taken. */
  reset(bits: number, initial: Iterable<bigint>): void {
    const marks = this.marks;
    const touched = this.touched;
    for (let k = 0; k < touched.length; k++) marks[touched[k]!] = 0;
    touched.length = 0;
    this.others.clear();
    this.limit = bits <= MARK_BITS ? 2 ** bits : 0;
    if (this.limit > marks.length) this.marks = new Uint8Array(this.limit);
    for (const v of initial) this.add(v);
  }

  has(v: bigint): boolean {
    if (v >= 0n && v < this.limit) return this.marks[Number(v)] === 1;
    return this.others.has(v);
  }

  add(v: bigint): void {
    if (v >= 0n && v < this.limit) {
      const i = Number(v);
      if (this.marks[i] === 0) {
        this.marks[i] = 1;
        this.touched.push(i);
      }
    } else this.others.add(v);
  }
}
