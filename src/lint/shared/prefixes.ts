/**
 * Prefix questions the rules ask about the packed table's SIDs, on 32-bit address words (most
 * significant first, as `PackedSidTable.w0..w3` hold them) so that a loop over every SID makes no
 * bigint; and an index of outermost prefixes for containment in log time.
 */
import { Prefix } from "../../net/prefix.js";
import { fromWords, getField, toWords } from "../../net/uint128.js";
import { type PackedSidTable, maskWord } from "../../sid/packed.js";
import { fieldAt } from "./sids.js";

/** A prefix as words: its first and last address, and its length. */
export interface WordRange {
  readonly f0: number;
  readonly f1: number;
  readonly f2: number;
  readonly f3: number;
  readonly l0: number;
  readonly l1: number;
  readonly l2: number;
  readonly l3: number;
  readonly len: number;
}

export function wordRange(p: Prefix): WordRange {
  const [f0, f1, f2, f3] = toWords(p.first);
  const [l0, l1, l2, l3] = toWords(p.last);
  return { f0, f1, f2, f3, l0, l1, l2, l3, len: p.len };
}

/** Prefix `p` of t (an index into t.prefixes) as words, host bits cleared; no bigint. */
export function wordRangeAt(t: PackedSidTable, p: number): WordRange {
  const len = t.plen[p]!;
  return maskRange(t.pw0[p]!, t.pw1[p]!, t.pw2[p]!, t.pw3[p]!, len);
}

/** `w` with every bit after its leading `bits` bits set (the last address's word). */
function withHostBits(w: number, bits: number): number {
  return (w | ~maskWord(0xffffffff, bits)) >>> 0;
}

/** Sign of (address a0..a3) - (address b0..b3). */
function compareWords(a0: number, a1: number, a2: number, a3: number, b0: number, b1: number, b2: number, b3: number): number {
  if (a0 !== b0) return a0 < b0 ? -1 : 1;
  if (a1 !== b1) return a1 < b1 ? -1 : 1;
  if (a2 !== b2) return a2 < b2 ? -1 : 1;
  return a3 === b3 ? 0 : a3 < b3 ? -1 : 1;
}

/** Sign of a.first - b.first. */
export function compareFirst(a: WordRange, b: WordRange): number {
  return compareWords(a.f0, a.f1, a.f2, a.f3, b.f0, b.f1, b.f2, b.f3);
}

/** The order of comparePrefixes: first address, then shorter first. */
export function compareRanges(a: WordRange, b: WordRange): number {
  return compareWords(a.f0, a.f1, a.f2, a.f3, b.f0, b.f1, b.f2, b.f3) || a.len - b.len;
}

/** True when all of `a` lies before `b` starts (a.last < b.first). */
export function endsBefore(a: WordRange, b: WordRange): boolean {
  return compareWords(a.l0, a.l1, a.l2, a.l3, b.f0, b.f1, b.f2, b.f3) < 0;
}

/** True when every address of `a` lies in `b` (Prefix.isSubnetOf: prefixes nest or are disjoint). */
export function isSubnetRange(a: WordRange, b: WordRange): boolean {
  return a.len >= b.len && compareWords(a.f0, a.f1, a.f2, a.f3, b.f0, b.f1, b.f2, b.f3) >= 0 && compareWords(a.f0, a.f1, a.f2, a.f3, b.l0, b.l1, b.l2, b.l3) <= 0;
}

/** The range as a Prefix (for text and for the bigint helpers). */
export function rangePrefix(r: WordRange): Prefix {
  return new Prefix(fromWords(r.f0, r.f1, r.f2, r.f3), r.len);
}

/** The smallest prefix covering all of `ranges` (coveringPrefix on words); undefined for none. */
export function coveringRange(ranges: readonly WordRange[]): WordRange | undefined {
  if (ranges.length === 0) return undefined;
  // the longest prefix holding the lowest first and the highest last address, and no longer than any of them
  let lo = ranges[0]!;
  let hi = ranges[0]!;
  let len = 128;
  for (const r of ranges) {
    if (compareFirst(r, lo) < 0) lo = r;
    if (compareWords(r.l0, r.l1, r.l2, r.l3, hi.l0, hi.l1, hi.l2, hi.l3) > 0) hi = r;
    len = Math.min(len, r.len);
  }
  const x = [lo.f0 ^ hi.l0, lo.f1 ^ hi.l1, lo.f2 ^ hi.l2, lo.f3 ^ hi.l3];
  let common = 0;
  for (let q = 0; q < 4 && common === 32 * q; q++) common += Math.clz32(x[q]!);
  return maskRange(lo.f0, lo.f1, lo.f2, lo.f3, Math.min(len, common));
}

/** The prefix of length `len` that holds the address w0..w3. */
export function maskRange(w0: number, w1: number, w2: number, w3: number, len: number): WordRange {
  const f0 = maskWord(w0, len);
  const f1 = maskWord(w1, len - 32);
  const f2 = maskWord(w2, len - 64);
  const f3 = maskWord(w3, len - 96);
  return { f0, f1, f2, f3, l0: withHostBits(f0, len), l1: withHostBits(f1, len - 32), l2: withHostBits(f2, len - 64), l3: withHostBits(f3, len - 96), len };
}

/** Sign of (SID i of t) - (address b0..b3). */
export function compareSid(t: PackedSidTable, i: number, b0: number, b1: number, b2: number, b3: number): number {
  let a = t.w0[i]!;
  if (a !== b0) return a < b0 ? -1 : 1;
  a = t.w1[i]!;
  if (a !== b1) return a < b1 ? -1 : 1;
  a = t.w2[i]!;
  if (a !== b2) return a < b2 ? -1 : 1;
  a = t.w3[i]!;
  return a === b3 ? 0 : a < b3 ? -1 : 1;
}

/** True when SID i of t lies in r. */
export function sidInRange(t: PackedSidTable, i: number, r: WordRange): boolean {
  return compareSid(t, i, r.f0, r.f1, r.f2, r.f3) >= 0 && compareSid(t, i, r.l0, r.l1, r.l2, r.l3) <= 0;
}

/** True when SIDs i and j of t have the same address. */
export function sameSid(t: PackedSidTable, i: number, j: number): boolean {
  return t.w0[i] === t.w0[j] && t.w1[i] === t.w1[j] && t.w2[i] === t.w2[j] && t.w3[i] === t.w3[j];
}

/** The words of SID i of t with only the first `len` bits kept, into `out`. */
export function maskSidInto(t: PackedSidTable, i: number, len: number, out: Uint32Array): void {
  out[0] = maskWord(t.w0[i]!, len);
  out[1] = maskWord(t.w1[i]!, len - 32);
  out[2] = maskWord(t.w2[i]!, len - 64);
  out[3] = maskWord(t.w3[i]!, len - 96);
}

interface Held<T> {
  readonly prefix: Prefix;
  readonly value: T;
  /** The prefix as words, when the caller has them (saves converting the bigints). */
  readonly range?: WordRange;
}

/**
 * Containment questions against a set of prefixes in log time. Only the outermost prefixes are
 * kept (a prefix nested in another adds no address), sorted by first address; prefixes nest or are
 * disjoint, so the one candidate for a question is the last kept prefix starting at or before it.
 * An empty set contains nothing. Questions are answered on words.
 */
export class PrefixIndex<T> {
  private readonly outer: Held<T>[] = [];
  private readonly ranges: WordRange[] = [];
  /** The last outer prefix a SID was found in (neighbouring SIDs mostly share one). */
  private lastHit = -1;

  constructor(items: readonly Held<T>[]) {
    const sorted = items.map((it) => ({ it, r: it.range ?? wordRange(it.prefix) })).sort((a, b) => compareRanges(a.r, b.r));
    for (const { it, r } of sorted) {
      const top = this.ranges[this.ranges.length - 1];
      if (top && !endsBefore(top, r)) continue; // nested in the previous outermost prefix
      this.outer.push(it);
      this.ranges.push(r);
    }
  }

  /** The outermost prefix of the set that holds all of `p`, if any. */
  containing(p: Prefix): Held<T> | undefined {
    return this.outer.length === 0 ? undefined : this.containingRange(wordRange(p));
  }

  /** The outermost prefix of the set that holds all of `p` (as words), if any. */
  containingRange(p: WordRange): Held<T> | undefined {
    const k = this.candidate(p.f0, p.f1, p.f2, p.f3);
    return k >= 0 && isSubnetRange(p, this.ranges[k]!) ? this.outer[k] : undefined;
  }

  /** The outermost prefix of the set that holds SID i of t, if any. */
  containingSid(t: PackedSidTable, i: number): Held<T> | undefined {
    const r = this.ranges;
    if (this.lastHit >= 0 && sidInRange(t, i, r[this.lastHit]!)) return this.outer[this.lastHit];
    const k = this.candidate(t.w0[i]!, t.w1[i]!, t.w2[i]!, t.w3[i]!);
    if (k < 0 || compareSid(t, i, r[k]!.l0, r[k]!.l1, r[k]!.l2, r[k]!.l3) > 0) return undefined;
    this.lastHit = k;
    return this.outer[k];
  }

  /** The last outer prefix starting at or before the address, or -1. */
  private candidate(a0: number, a1: number, a2: number, a3: number): number {
    const r = this.ranges;
    let lo = 0;
    let hi = r.length - 1;
    let best = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      const m = r[mid]!;
      if (compareWords(m.f0, m.f1, m.f2, m.f3, a0, a1, a2, a3) <= 0) {
        best = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    return best;
  }
}

/**
 * The `width`-bit field at `offset` (bit 0 = most significant) of SID i of t: what getField gives
 * on its address, as a number for fields of up to 32 bits (a bigint for wider ones).
 */
export function sidField(t: PackedSidTable, i: number, offset: number, width: number): number | bigint {
  if (offset < 0 || width < 0 || offset + width > 128) throw new RangeError(`field ${offset}+${width} exceeds 128 bits`);
  return width > 32 ? getField(t.sidAt(i), offset, width) : fieldAt(t, i, offset, width);
}
