/**
 * The function values of a lock as the fast reader keeps them: each key stays a range of the
 * lock's bytes, found by a hash of its bytes, instead of becoming one of a million strings in one
 * of twenty thousand Maps. The allocator asks `find(algorithm, key)` for each SID it carves; it
 * never needs the keys as strings when the lock is up to date.
 *
 * Each owner's functions are a LockedFunctions: a Map that fills itself from the bytes the first
 * time it is used as a Map (get, has, iteration, changes), so every other reader of a lock sees an
 * ordinary Map with the keys in the file's order. Only keys of the plain form `algorithm|rest`
 * (the algorithm in decimal without leading zeros, the rest printable ASCII without escapes) are
 * kept this way; the fast reader gives an owner with any other key, or the same key twice, an
 * ordinary Map.
 */
import { grownColumn } from "../sid/columns.js";
import { smallBigInt } from "./lock-model.js";

/** FNV-1a over a string's UTF-16 code units (for the plain keys, their bytes). */
export function keyHash(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193);
  return h | 0;
}

/** keyHash of the bytes b[start, end). */
export function keyHashBytes(b: Uint8Array, start: number, end: number): number {
  let h = 0x811c9dc5;
  for (let i = start; i < end; i++) h = Math.imul(h ^ b[i]!, 0x01000193);
  return h | 0;
}

/** A FunctionStore's columns (see FunctionStore.parts). */
export interface StoreParts {
  readonly count: number;
  readonly keyStart: Int32Array<ArrayBuffer>;
  readonly rest: Int32Array<ArrayBuffer>;
  readonly end: Int32Array<ArrayBuffer>;
  readonly algo: Int32Array<ArrayBuffer>;
  readonly hash: Int32Array<ArrayBuffer>;
  readonly value: Float64Array<ArrayBuffer>;
  readonly ord: Int32Array<ArrayBuffer>;
  readonly ordHash: Int32Array<ArrayBuffer>;
  readonly big: Map<number, bigint>;
}

/**
 * Every plain function entry of a lock: where its key's rest (after `algorithm|`) lies in the
 * bytes, its algorithm, the hash of the rest and its value (values of more than 53 bits aside).
 * Each owner's entries are contiguous; `index` sorts them by hash (in `ord`/`ordHash`, beside the
 * entries), and a lookup is a binary search there: an owner's few dozen entries sit in a few
 * cache lines, where one table for the whole lock would cost a cache miss or more per lookup.
 */
export class FunctionStore {
  private n = 0;
  private keyStart = new Int32Array(1024);
  private rest = new Int32Array(1024);
  private end = new Int32Array(1024);
  private algo = new Int32Array(1024);
  private hash = new Int32Array(1024);
  private value = new Float64Array(1024);
  /** Entry ids of each owner's range in hash order, and their hashes. */
  private ord = new Int32Array(1024);
  private ordHash = new Int32Array(1024);
  private big = new Map<number, bigint>();

  constructor(readonly bytes: Buffer) {}

  /** The store's columns, to be sent to another thread (the bytes are not among them: they are shared, or sent apart). */
  parts(): StoreParts {
    const n = this.n;
    const cut = <T extends Int32Array | Float64Array>(a: T): T => a.slice(0, n) as T;
    return { count: n, keyStart: cut(this.keyStart), rest: cut(this.rest), end: cut(this.end), algo: cut(this.algo), hash: cut(this.hash), value: cut(this.value), ord: cut(this.ord), ordHash: cut(this.ordHash), big: this.big };
  }

  /** A store over `bytes` from the columns parts() gave for the same bytes. */
  static fromParts(bytes: Buffer, p: StoreParts): FunctionStore {
    const s = new FunctionStore(bytes);
    s.n = p.count;
    s.keyStart = p.keyStart;
    s.rest = p.rest;
    s.end = p.end;
    s.algo = p.algo;
    s.hash = p.hash;
    s.value = p.value;
    s.ord = p.ord;
    s.ordHash = p.ordHash;
    s.big = p.big;
    return s;
  }

  get count(): number {
    return this.n;
  }

  /**
   * Record an entry: its key is the bytes [keyStart, end), of which [rest, end) follow the `|`;
   * `value` is the value when it fits 53 bits, else -1 and `bigValue` holds it.
   */
  push(keyStart: number, rest: number, end: number, algo: number, value: number, bigValue?: bigint): void {
    if (this.n === this.rest.length) this.grow();
    const i = this.n++;
    this.keyStart[i] = keyStart;
    this.rest[i] = rest;
    this.end[i] = end;
    this.algo[i] = algo;
    this.hash[i] = keyHashBytes(this.bytes, rest, end);
    this.value[i] = value;
    if (value < 0 && bigValue !== undefined) this.big.set(i, bigValue);
  }

  private grow(): void {
    const cap = this.rest.length * 2;
    const more = <T extends Int32Array | Float64Array>(a: T): T => grownColumn(a, cap);
    this.keyStart = more(this.keyStart);
    this.rest = more(this.rest);
    this.end = more(this.end);
    this.algo = more(this.algo);
    this.hash = more(this.hash);
    this.value = more(this.value);
    this.ord = more(this.ord);
    this.ordHash = more(this.ordHash);
  }

  /** Sort the entries [from, to) of one owner by hash for find. False when two of them have the same key (a hand-edited lock). */
  index(from: number, to: number): boolean {
    const { ord, ordHash, hash } = this;
    if (to - from <= 64) {
      // insertion sort: an owner has a few dozen entries
      for (let i = from; i < to; i++) {
        const h = hash[i]!;
        let j = i;
        while (j > from && ordHash[j - 1]! > h) {
          ord[j] = ord[j - 1]!;
          ordHash[j] = ordHash[j - 1]!;
          j--;
        }
        ord[j] = i;
        ordHash[j] = h;
      }
    } else {
      const ids = Array.from({ length: to - from }, (_, k) => from + k).sort((a, b) => hash[a]! - hash[b]! || a - b);
      for (let k = 0; k < ids.length; k++) {
        ord[from + k] = ids[k]!;
        ordHash[from + k] = hash[ids[k]!]!;
      }
    }
    // a key twice: the same hash, algorithm and bytes (equal hashes sit side by side)
    const b = this.bytes;
    for (let i = from; i < to; i++) {
      for (let j = i + 1; j < to && ordHash[j] === ordHash[i]; j++) {
        const x = ord[i]!;
        const y = ord[j]!;
        if (this.algo[x] !== this.algo[y]) continue;
        const len = this.end[x]! - this.rest[x]!;
        if (this.end[y]! - this.rest[y]! !== len) continue;
        if (b.compare(b, this.rest[y]!, this.end[y]!, this.rest[x]!, this.end[x]!) === 0) return false;
      }
    }
    return true;
  }

  /** The entry among [from, to) (sorted by index) with this algorithm whose rest is `key` (hash: keyHash(key)), or -1. */
  find(from: number, to: number, algo: number, key: string, hash: number): number {
    const ordHash = this.ordHash;
    let lo = from;
    let hi = to;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (ordHash[mid]! < hash) lo = mid + 1;
      else hi = mid;
    }
    const b = this.bytes;
    const len = key.length;
    for (; lo < to && ordHash[lo] === hash; lo++) {
      const e = this.ord[lo]!;
      if (this.algo[e] !== algo) continue;
      const r = this.rest[e]!;
      if (this.end[e]! - r !== len) continue;
      let j = 0;
      while (j < len && b[r + j] === key.charCodeAt(j)) j++;
      if (j === len) return e;
    }
    return -1;
  }

  /** Where entry i's whole key lies in the bytes: [keyStartAt(i), keyEndAt(i)). */
  keyStartAt(i: number): number {
    return this.keyStart[i]!;
  }
  keyEndAt(i: number): number {
    return this.end[i]!;
  }

  /** Entry i's value as a number, or -1 when it has 53 bits or more (valueAt gives it). */
  numberAt(i: number): number {
    return this.value[i]!;
  }

  /** True when the whole keys of entries [from, to) rise strictly, byte by byte. */
  risingKeys(from: number, to: number): boolean {
    const b = this.bytes;
    for (let e = from + 1; e < to; e++) {
      const a0 = this.keyStart[e - 1]!;
      const a1 = this.end[e - 1]!;
      const b0 = this.keyStart[e]!;
      const b1 = this.end[e]!;
      let j = 0;
      while (a0 + j < a1 && b0 + j < b1 && b[a0 + j] === b[b0 + j]) j++;
      // equal up to the shorter one: the shorter comes first
      if (a0 + j === a1) {
        if (b0 + j === b1) return false;
        continue;
      }
      if (b0 + j === b1 || b[a0 + j]! > b[b0 + j]!) return false;
    }
    return true;
  }

  valueAt(i: number): bigint {
    const v = this.value[i]!;
    return v >= 0 ? smallBigInt(v) : this.big.get(i)!;
  }

  algorithmAt(i: number): number {
    return this.algo[i]!;
  }

  /** The whole key of entry i, decoded as JSON.parse would (escapes, UTF-8). */
  keyAt(i: number): string {
    const start = this.keyStart[i]!;
    const end = this.end[i]!;
    const b = this.bytes;
    let ascii = true;
    for (let j = start; j < end; j++) {
      const c = b[j]!;
      if (c === 0x5c) return JSON.parse(b.toString("utf8", start - 1, end + 1)) as string;
      if (c >= 0x80) ascii = false;
    }
    return b.toString(ascii ? "latin1" : "utf8", start, end);
  }
}

/**
 * How many keys of an owner's locked functions belong to each algorithm (keys are
 * `algorithm|...`); for the fast reader's functions, from the store, without making the Map.
 */
export function countsByAlgorithm(fns: ReadonlyMap<string, bigint>): Map<number, number> {
  const counts = new Map<number, number>();
  const add = (a: number) => counts.set(a, (counts.get(a) ?? 0) + 1);
  if (fns instanceof LockedFunctions && !fns.isFilled) for (let i = fns.from; i < fns.to; i++) add(fns.store.algorithmAt(i));
  else for (const k of fns.keys()) add(Number(k.slice(0, k.indexOf("|"))));
  return counts;
}

/** One owner's locked functions: entries [from, to) of a FunctionStore, as a Map made when first used as one. */
export class LockedFunctions extends Map<string, bigint> {
  private filled = false;

  constructor(
    /** The entries' store, shared by every owner of one lock. */
    readonly store: FunctionStore,
    /** The owner's entries are [from, to) of the store. */
    readonly from: number,
    readonly to: number,
  ) {
    super();
  }

  /** The value locked for `algorithm|key` (hash: keyHash(key)), without making the Map. */
  lookup(algo: number, key: string, hash: number): bigint | undefined {
    if (this.filled) return super.get(`${algo}|${key}`);
    const e = this.store.find(this.from, this.to, algo, key, hash);
    return e < 0 ? undefined : this.store.valueAt(e);
  }

  /**
   * True when the entries, unchanged since they were read, are in the order the lock's text
   * lists them (its keys sorted: for these plain ASCII keys, the order of their bytes), so that
   * a writer may copy them from the bytes.
   */
  inTextOrder(): boolean {
    return !this.filled && this.store.risingKeys(this.from, this.to);
  }

  /** True once the Map has been made (it may have changed since: its entries are then the Map's). */
  get isFilled(): boolean {
    return this.filled;
  }

  private fill(): void {
    if (this.filled) return;
    this.filled = true;
    for (let i = this.from; i < this.to; i++) super.set(this.store.keyAt(i), this.store.valueAt(i));
  }

  override get size(): number {
    return this.filled ? super.size : this.to - this.from;
  }
  override get(key: string): bigint | undefined {
    this.fill();
    return super.get(key);
  }
  override has(key: string): boolean {
    this.fill();
    return super.has(key);
  }
  override set(key: string, value: bigint): this {
    this.fill();
    return super.set(key, value);
  }
  override delete(key: string): boolean {
    this.fill();
    return super.delete(key);
  }
  override clear(): void {
    this.filled = true;
    super.clear();
  }
  override forEach(f: (value: bigint, key: string, map: Map<string, bigint>) => void, thisArg?: unknown): void {
    this.fill();
    super.forEach(f, thisArg);
  }
  override keys(): MapIterator<string> {
    this.fill();
    return super.keys();
  }
  override values(): MapIterator<bigint> {
    this.fill();
    return super.values();
  }
  override entries(): MapIterator<[string, bigint]> {
    this.fill();
    return super.entries();
  }
  override [Symbol.iterator](): MapIterator<[string, bigint]> {
    this.fill();
    return super[Symbol.iterator]();
  }
}
