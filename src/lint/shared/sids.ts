/**
 * What the SID rules need to read the packed table (ctx.packed) without an object, string or
 * bigint per SID: the order of ctx.sids as a comparison, groups of SIDs that name the same SID as
 * the object rules did, address bits on the 32-bit words, and kinds of SIDs (behaviour, flavour
 * set, structure, codepoint) so that a rule judges each distinct combination once.
 */
import type { Prefix } from "../../net/prefix.js";
import { toWords } from "../../net/uint128.js";
import type { PackedSidTable } from "../../sid/packed.js";
import type { SidStructure } from "../../sid/table.js";
import type { RuleContext } from "../types.js";

/**
 * Sign of SID a minus SID b in the order of ctx.sids (and ctx.packed.sidOrder): by address, then
 * node name, then source order.
 */
export function compareSids(t: PackedSidTable, a: number, b: number): number {
  if (a === b) return 0;
  let x = t.w0[a]!;
  let y = t.w0[b]!;
  if (x !== y) return x < y ? -1 : 1;
  x = t.w1[a]!;
  y = t.w1[b]!;
  if (x !== y) return x < y ? -1 : 1;
  x = t.w2[a]!;
  y = t.w2[b]!;
  if (x !== y) return x < y ? -1 : 1;
  x = t.w3[a]!;
  y = t.w3[b]!;
  if (x !== y) return x < y ? -1 : 1;
  const rank = t.nodeRank;
  return rank[t.node[a]!]! - rank[t.node[b]!]! || a - b;
}

/** SID indices sorted into the order of ctx.sids. */
export function inSidOrder(t: PackedSidTable, ids: number[]): number[] {
  return ids.sort((a, b) => compareSids(t, a, b));
}

/** A node key per SID: equal node names give equal keys (SidTables may repeat a node name). */
export function nodeKeyOf(t: PackedSidTable, i: number): number {
  return t.nodeRank[t.node[i]!]!;
}

/**
 * SIDs that one finding reports. The object rules walked ctx.sids in order and kept as "first"
 * the group's first SID, replaced by any later one with a lower row when both have a row; `first`
 * gives that SID whatever order the SIDs are added in.
 */
export class SidGroup<T = undefined> {
  count = 1;
  /** The group's first SID in ctx.sids order. */
  lead: number;
  /** Its SID with the lowest row (the earlier in ctx.sids order on a tie); -1 when none has a row. */
  lowest: number;
  /** The group's first SIDs in ctx.sids order, `keep` of them at most (the first alone when keep is 1). */
  readonly examples: number[];

  constructor(
    private readonly t: PackedSidTable,
    readonly data: T,
    i: number,
    private readonly keep = 1,
  ) {
    this.lead = i;
    this.lowest = t.row[i]! > 0 ? i : -1;
    this.examples = [i];
  }

  /** Add SID i to the group. */
  take(i: number): void {
    const t = this.t;
    this.count++;
    if (compareSids(t, i, this.lead) < 0) {
      this.lead = i;
      if (this.keep === 1) this.examples[0] = i;
    }
    const r = t.row[i]!;
    if (r > 0) {
      const lr = this.lowest < 0 ? 0 : t.row[this.lowest]!;
      if (lr === 0 || r < lr || (r === lr && compareSids(t, i, this.lowest) < 0)) this.lowest = i;
    }
    const ex = this.examples;
    if (this.keep > 1 && (ex.length < this.keep || compareSids(t, i, ex[ex.length - 1]!) < 0)) {
      let k = ex.length;
      while (k > 0 && compareSids(t, i, ex[k - 1]!) < 0) k--;
      ex.splice(k, 0, i);
      if (ex.length > this.keep) ex.pop();
    }
  }

  /** The SID the finding names and is located at. */
  get first(): number {
    return this.t.row[this.lead]! > 0 ? this.lowest : this.lead;
  }
}

/** Groups of SIDs by a key (a number made of small ids, or a string), in any order of adding. */
export class SidGroups<T = undefined> {
  private readonly map = new Map<number | string, SidGroup<T>>();

  /** `examples`: how many of each group's first SIDs (in ctx.sids order) to keep. */
  constructor(
    private readonly t: PackedSidTable,
    private readonly examples = 1,
  ) {}

  get size(): number {
    return this.map.size;
  }

  get(key: number | string): SidGroup<T> | undefined {
    return this.map.get(key);
  }

  /** The keys and groups, in the order the groups were made. */
  entries(): IterableIterator<[number | string, SidGroup<T>]> {
    return this.map.entries();
  }

  /** Add SID i to the group of `key`; `data` is kept when the group is new. */
  add(key: number | string, i: number, data: T): SidGroup<T> {
    let g = this.map.get(key);
    if (g) g.take(i);
    else this.map.set(key, (g = new SidGroup(this.t, data, i, this.examples)));
    return g;
  }

  /**
   * The groups in the order of their first SID in ctx.sids: the order the object rules made them
   * in. `tie` orders groups that one SID made (in the order the rule adds a SID to them).
   */
  ordered(tie?: (a: SidGroup<T>, b: SidGroup<T>) => number): SidGroup<T>[] {
    const t = this.t;
    return [...this.map.values()].sort((a, b) => compareSids(t, a.lead, b.lead) || (tie ? tie(a, b) : 0));
  }
}

// ------------------------------------------------------------------ address bits on words

/** The leading `bits` bits of a 32-bit word as a mask (bits <= 0: none; >= 32: all). */
export function leadMask(bits: number): number {
  return bits >= 32 ? -1 : bits <= 0 ? 0 : ~(-1 >>> bits);
}

/** Word k (0 = most significant) of SID i. */
export function wordOf(t: PackedSidTable, i: number, k: number): number {
  return k === 0 ? t.w0[i]! : k === 1 ? t.w1[i]! : k === 2 ? t.w2[i]! : t.w3[i]!;
}

/** True when prefix `p` (an id into t.prefixes; host bits ignored) contains SID i. */
export function prefixHolds(t: PackedSidTable, p: number, i: number): boolean {
  const L = t.plen[p]!;
  return (
    ((t.w0[i]! ^ t.pw0[p]!) & leadMask(L)) === 0 &&
    ((t.w1[i]! ^ t.pw1[p]!) & leadMask(L - 32)) === 0 &&
    ((t.w2[i]! ^ t.pw2[p]!) & leadMask(L - 64)) === 0 &&
    ((t.w3[i]! ^ t.pw3[p]!) & leadMask(L - 96)) === 0
  );
}

/** True when prefix `p` has no bit set after its length (Prefix.hasHostBits is false), read on words. */
export function prefixClean(t: PackedSidTable, p: number): boolean {
  const L = t.plen[p]!;
  return (t.pw0[p]! & ~leadMask(L)) === 0 && (t.pw1[p]! & ~leadMask(L - 32)) === 0 && (t.pw2[p]! & ~leadMask(L - 64)) === 0 && (t.pw3[p]! & ~leadMask(L - 96)) === 0;
}

/** True when SIDs i and j agree on their first `len` bits. */
export function sameLead(t: PackedSidTable, i: number, j: number, len: number): boolean {
  return (
    ((t.w0[i]! ^ t.w0[j]!) & leadMask(len)) === 0 &&
    ((t.w1[i]! ^ t.w1[j]!) & leadMask(len - 32)) === 0 &&
    ((t.w2[i]! ^ t.w2[j]!) & leadMask(len - 64)) === 0 &&
    ((t.w3[i]! ^ t.w3[j]!) & leadMask(len - 96)) === 0
  );
}

/** True when the `width`-bit field at `offset` of SID i is zero (getField(sid, offset, width) === 0n). */
export function fieldIsZero(t: PackedSidTable, i: number, offset: number, width: number): boolean {
  if (width === 0) return true;
  const end = offset + width;
  for (let k = offset >>> 5; k < 4 && 32 * k < end; k++) {
    if ((wordOf(t, i, k) & leadMask(end - 32 * k) & ~leadMask(offset - 32 * k)) !== 0) return false;
  }
  return true;
}

/** The `width`-bit field at `offset` of SID i as a number; width 0..32, offset + width <= 128. */
export function fieldAt(t: PackedSidTable, i: number, offset: number, width: number): number {
  if (width === 0) return 0;
  const end = offset + width;
  const k = offset >>> 5;
  const w = wordOf(t, i, k);
  const inFirst = 32 * (k + 1) - offset; // bits of the field in word k
  if (inFirst >= width) return ((w >>> (inFirst - width)) & (-1 >>> (32 - width))) >>> 0;
  const rest = end - 32 * (k + 1);
  const hi = (w & (-1 >>> (32 - inFirst))) >>> 0;
  return hi * 2 ** rest + (wordOf(t, i, k + 1) >>> (32 - rest));
}

/**
 * A map from prefixes to values, looked up with the leading bits of a SID: no string or bigint
 * per lookup. The last entry found is tried first, as neighbouring SIDs mostly share a prefix.
 */
export class PrefixMap<V> {
  private readonly buckets = new Map<number, Entry<V>[]>();
  private last: Entry<V> | undefined;
  private readonly list: Entry<V>[] = [];

  constructor(private readonly t: PackedSidTable) {}

  private static hash(len: number, m0: number, m1: number, m2: number, m3: number): number {
    let h = Math.imul(len + 1, 0x9e3779b1);
    h = Math.imul(h ^ m0, 0x85ebca6b);
    h = Math.imul(h ^ m1, 0xc2b2ae35);
    h = Math.imul(h ^ m2, 0x85ebca6b);
    h = Math.imul(h ^ m3, 0xc2b2ae35);
    return h ^ (h >>> 15);
  }

  /** The value of the first `len` bits of SID i, if set. */
  get(i: number, len: number): V | undefined {
    return this.find(i, len)?.value;
  }

  /** Set the value of the first `len` bits of SID i. */
  set(i: number, len: number, value: V): void {
    const t = this.t;
    this.put(len, t.w0[i]! & leadMask(len), t.w1[i]! & leadMask(len - 32), t.w2[i]! & leadMask(len - 64), t.w3[i]! & leadMask(len - 96), value);
  }

  /** Set the value of a prefix (host bits ignored). */
  setPrefix(p: Prefix, value: V): void {
    const [w0, w1, w2, w3] = toWords(p.first);
    this.put(p.len, w0 & leadMask(p.len), w1 & leadMask(p.len - 32), w2 & leadMask(p.len - 64), w3 & leadMask(p.len - 96), value);
  }

  private put(len: number, m0: number, m1: number, m2: number, m3: number, value: V): void {
    const e = this.lookup(len, m0, m1, m2, m3);
    if (e) {
      e.value = value;
      return;
    }
    const h = PrefixMap.hash(len, m0, m1, m2, m3);
    const n: Entry<V> = { len, m0, m1, m2, m3, value };
    const b = this.buckets.get(h);
    if (b) b.push(n);
    else this.buckets.set(h, [n]);
    this.list.push(n);
    this.last = n;
  }

  /** The values, in the order they were first set. */
  values(): V[] {
    return this.list.map((e) => e.value);
  }

  private find(i: number, len: number): Entry<V> | undefined {
    const t = this.t;
    return this.lookup(len, t.w0[i]! & leadMask(len), t.w1[i]! & leadMask(len - 32), t.w2[i]! & leadMask(len - 64), t.w3[i]! & leadMask(len - 96));
  }

  private lookup(len: number, m0: number, m1: number, m2: number, m3: number): Entry<V> | undefined {
    const l = this.last;
    if (l && l.len === len && l.m0 === m0 && l.m1 === m1 && l.m2 === m2 && l.m3 === m3) return l;
    const b = this.buckets.get(PrefixMap.hash(len, m0, m1, m2, m3));
    if (!b) return undefined;
    for (const e of b) {
      if (e.len === len && e.m0 === m0 && e.m1 === m1 && e.m2 === m2 && e.m3 === m3) {
        this.last = e;
        return e;
      }
    }
    return undefined;
  }
}

interface Entry<V> {
  readonly len: number;
  readonly m0: number;
  readonly m1: number;
  readonly m2: number;
  readonly m3: number;
  value: V;
}

// ------------------------------------------------------------------ kinds of SIDs

/**
 * SIDs that agree on behaviour, flavour set, structure and codepoint are of one kind: a table of a
 * million SIDs has a few dozen kinds, so a rule judges each kind once and most rules can tell
 * from the kinds alone that they have nothing to report.
 */
export interface SidKinds {
  /** Kind of each SID of ctx.packed.table. */
  readonly of: Int32Array;
  readonly count: number;
  /** Per kind: behaviour id, flavour-set id, structure id (-1: none) and codepoint (NaN: none). */
  readonly behavior: Int32Array;
  readonly flavorSet: Int32Array;
  readonly structure: Int32Array;
  readonly codepoint: Float64Array;
}

export function sidKinds(ctx: RuleContext): SidKinds {
  const t = ctx.packed.table; // made before: a view is not made inside another
  return ctx.shared("sids:kinds", () => {
    const n = t.count;
    const of = new Int32Array(n);
    // codepoint ids: 0 for none, then in order of appearance (a table for 0..65535, a map for other values)
    const cps: number[] = [NaN];
    const dense = new Int32Array(65536); // id + 1
    const other = new Map<number, number>();
    for (let i = 0; i < n; i++) {
      const c = t.codepoint[i]!;
      if (c !== c) continue; // NaN: id 0
      const d = dense[c]; // undefined for a value that is not an index 0..65535
      let id: number;
      if (d !== undefined) {
        if (d === 0) {
          dense[c] = cps.length + 1;
          cps.push(c);
        }
        id = dense[c]! - 1;
      } else {
        let o = other.get(c);
        if (o === undefined) other.set(c, (o = cps.push(c) - 1));
        id = o;
      }
      of[i] = id;
    }
    const nF = t.flavorSets.length;
    const nS = t.structures.length + 1;
    const nC = cps.length;
    const size = t.behaviors.length * nF * nS * nC;
    const kb: number[] = [];
    const kf: number[] = [];
    const ks: number[] = [];
    const kc: number[] = [];
    const open = (i: number, c: number): number => {
      kb.push(t.behavior[i]!);
      kf.push(t.flavorSet[i]!);
      ks.push(t.structure[i]!);
      kc.push(cps[c]!);
      return kb.length - 1;
    };
    if (size <= 1 << 22) {
      const ids = new Int32Array(size).fill(-1);
      for (let i = 0; i < n; i++) {
        const c = of[i]!;
        const key = ((t.behavior[i]! * nF + t.flavorSet[i]!) * nS + t.structure[i]! + 1) * nC + c;
        let k = ids[key]!;
        if (k < 0) ids[key] = k = open(i, c);
        of[i] = k;
      }
    } else {
      // many distinct values (a table built by hand): a map, keyed by text when a number could lose bits
      const ids = new Map<number | string, number>();
      const exact = size <= Number.MAX_SAFE_INTEGER;
      for (let i = 0; i < n; i++) {
        const c = of[i]!;
        const key = exact ? ((t.behavior[i]! * nF + t.flavorSet[i]!) * nS + t.structure[i]! + 1) * nC + c : `${t.behavior[i]},${t.flavorSet[i]},${t.structure[i]},${c}`;
        let k = ids.get(key);
        if (k === undefined) ids.set(key, (k = open(i, c)));
        of[i] = k;
      }
    }
    return { of, count: kb.length, behavior: Int32Array.from(kb), flavorSet: Int32Array.from(kf), structure: Int32Array.from(ks), codepoint: Float64Array.from(kc) };
  });
}

/** The SIDs (in source order) whose kind is marked (marked[kind] === 1). */
export function sidsOfKinds(kinds: SidKinds, marked: Uint8Array): number[] {
  const out: number[] = [];
  const of = kinds.of;
  for (let i = 0; i < of.length; i++) if (marked[of[i]!] === 1) out.push(i);
  return out;
}

/** Ids for distinct strings (e.g. the part of a group key that several flavour sets share). */
export class Interner {
  private readonly ids = new Map<string, number>();

  id(s: string): number {
    let v = this.ids.get(s);
    if (v === undefined) this.ids.set(s, (v = this.ids.size));
    return v;
  }
}

/** Per structure id of t: an id of `key(structure)`, equal ids for equal keys (e.g. block/node/function, argument left out). */
export function structureKeyIds(t: PackedSidTable, key: (s: SidStructure) => string): Int32Array {
  const ids = new Interner();
  return Int32Array.from(t.structures, (s) => ids.id(key(s)));
}
