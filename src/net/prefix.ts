/**
 * IPv6 prefixes as small immutable values, with the vocabulary of Python's ipaddress
 * (contains, overlaps, isSubnetOf, supernet, subnets, collapse, summarizeRange).
 */
import { type Addr, ALL_ONES, commonPrefixLength, hostMask, prefixMask } from "./uint128.js";
import { formatAddr, parsePrefixParts, type ParseResult } from "./text.js";

/**
 * A prefix: an address and a length 0..128. The address keeps every bit the user wrote, so
 * `hasHostBits` can report a prefix like `2001:db8::1/64` instead of silently masking it;
 * `masked()` is the separate call that clears the host bits.
 */
export class Prefix {
  readonly addr: Addr;
  readonly len: number;

  constructor(addr: Addr, len: number) {
    if (!Number.isInteger(len) || len < 0 || len > 128) throw new RangeError(`prefix length ${len} is not 0..128`);
    if (addr < 0n || addr > ALL_ONES) throw new RangeError("address outside 128 bits");
    this.addr = addr;
    this.len = len;
  }

  /** True when bits after the length are not all zero. */
  get hasHostBits(): boolean {
    return (this.addr & hostMask(this.len)) !== 0n;
  }

  /** The same prefix with host bits cleared (returns `this` when already clean). */
  masked(): Prefix {
    return this.hasHostBits ? new Prefix(this.addr & prefixMask(this.len), this.len) : this;
  }

  /** First address (the masked network address). */
  get first(): Addr {
    return this.addr & prefixMask(this.len);
  }

  /** Last address covered. */
  get last(): Addr {
    return this.first | hostMask(this.len);
  }

  /** Number of addresses covered, 2^(128-len). */
  get size(): bigint {
    return 1n << BigInt(128 - this.len);
  }

  /** True when `addr` lies inside the prefix. */
  contains(addr: Addr): boolean {
    return (addr & prefixMask(this.len)) === this.first;
  }

  /** True when the two prefixes share at least one address (symmetric). */
  overlaps(other: Prefix): boolean {
    const l = Math.min(this.len, other.len);
    const m = prefixMask(l);
    return (this.addr & m) === (other.addr & m);
  }

  /** True when every address of `this` lies in `other` (a prefix is a subnet of itself). */
  isSubnetOf(other: Prefix): boolean {
    return this.len >= other.len && other.contains(this.addr);
  }

  /** True when every address of `other` lies in `this`. */
  isSupernetOf(other: Prefix): boolean {
    return other.isSubnetOf(this);
  }

  /** Same network and length (host bits ignored). */
  equals(other: Prefix): boolean {
    return this.len === other.len && this.first === other.first;
  }

  /** The covering prefix of length `to` (default len-1). Throws for to > len or len 0. */
  supernet(to: number = this.len - 1): Prefix {
    if (to < 0 || to > this.len) throw new RangeError(`cannot widen /${this.len} to /${to}`);
    return new Prefix(this.addr & prefixMask(to), to);
  }

  /** The n-th subnet of length `to` inside this prefix (n from 0). */
  subnetAt(to: number, n: bigint): Prefix {
    if (to < this.len || to > 128) throw new RangeError(`cannot split /${this.len} into /${to}`);
    const count = 1n << BigInt(to - this.len);
    if (n < 0n || n >= count) throw new RangeError(`subnet index ${n} outside 0..${count - 1n}`);
    return new Prefix(this.first | (n << BigInt(128 - to)), to);
  }

  /** The address at offset n from the first address. */
  at(n: bigint): Addr {
    if (n < 0n || n >= this.size) throw new RangeError(`offset ${n} outside the prefix`);
    return this.first + n;
  }

  /** RFC 5952 text, `addr/len`, with the bits as written (host bits kept). */
  format(): string {
    return `${formatAddr(this.addr)}/${this.len}`;
  }

  toString(): string {
    return this.format();
  }
}

/** Order prefixes by first address, then shorter first (a supernet sorts before its subnets). */
export function comparePrefixes(a: Prefix, b: Prefix): number {
  const fa = a.first;
  const fb = b.first;
  if (fa !== fb) return fa < fb ? -1 : 1;
  return a.len - b.len;
}

/** The smallest prefix that covers both (their longest common prefix). */
export function smallestCommonPrefix(a: Prefix, b: Prefix): Prefix {
  const l = Math.min(a.len, b.len, commonPrefixLength(a.first, b.first));
  return new Prefix(a.first & prefixMask(l), l);
}

/** The smallest single prefix covering all of `prefixes`; undefined for an empty list. */
export function coveringPrefix(prefixes: readonly Prefix[]): Prefix | undefined {
  let acc: Prefix | undefined;
  for (const p of prefixes) acc = acc === undefined ? p.masked() : smallestCommonPrefix(acc, p);
  return acc;
}

/**
 * The minimal list of prefixes that exactly covers first..last (inclusive), like Python's
 * ipaddress.summarize_address_range. Throws for first > last.
 */
export function summarizeRange(first: Addr, last: Addr): Prefix[] {
  if (first > last) throw new RangeError("range first > last");
  const out: Prefix[] = [];
  let cur = first;
  while (cur <= last) {
    // largest block aligned at cur that does not pass last
    let len = cur === 0n ? 0 : 128 - trailingZeros(cur);
    while (len < 128 && cur + (1n << BigInt(128 - len)) - 1n > last) len++;
    out.push(new Prefix(cur, len));
    const next = cur + (1n << BigInt(128 - len));
    if (next > ALL_ONES) break;
    cur = next;
  }
  return out;
}

function trailingZeros(x: bigint): number {
  if (x === 0n) return 128;
  let n = 0;
  while ((x & 1n) === 0n) {
    x >>= 1n;
    n++;
  }
  return n;
}

/**
 * Merge overlapping and adjacent prefixes into the minimal covering list (sorted), like
 * Python's ipaddress.collapse_addresses. Host bits are ignored.
 */
export function collapse(prefixes: readonly Prefix[]): Prefix[] {
  const sorted = prefixes.map((p) => p.masked()).sort(comparePrefixes);
  const ranges: [Addr, Addr][] = [];
  for (const p of sorted) {
    const top = ranges[ranges.length - 1];
    if (top && p.first <= top[1] + 1n) {
      if (p.last > top[1]) top[1] = p.last;
    } else ranges.push([p.first, p.last]);
  }
  return ranges.flatMap(([f, l]) => summarizeRange(f, l));
}

/** `outer` minus `inner`: the prefixes covering what is left (sorted); [outer] when disjoint. */
export function exclude(outer: Prefix, inner: Prefix): Prefix[] {
  if (!outer.overlaps(inner)) return [outer.masked()];
  if (outer.isSubnetOf(inner)) return [];
  const out: Prefix[] = [];
  let cur = outer.masked();
  while (cur.len < inner.len) {
    const lo = cur.subnetAt(cur.len + 1, 0n);
    const hi = cur.subnetAt(cur.len + 1, 1n);
    if (inner.isSubnetOf(lo)) {
      out.push(hi);
      cur = lo;
    } else {
      out.push(lo);
      cur = hi;
    }
  }
  return out.sort(comparePrefixes);
}

/** Parse `addr/len` text into a Prefix, keeping host bits so callers can report them. */
export function parsePrefix(text: string): ParseResult<Prefix> {
  const r = parsePrefixParts(text);
  return r.ok ? { ok: true, value: new Prefix(r.value.addr, r.value.len) } : r;
}
