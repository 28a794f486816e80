/**
 * Where the allocator writes its SIDs: a packed table (src/sid/packed.ts), node by node, without
 * a SidEntry object or a bigint address per SID. The allocator hands each node's rows over in
 * any order; `writeNode` sorts them (by address, then algorithm, then behaviour: the order of a
 * node's SIDs in every table we make) and appends them to the columns. Rows are reused from one
 * node to the next.
 *
 * `SidEntry` objects are made from the columns only when someone asks (`PackedSidTable.entry`,
 * `toTable`, which sorts the nodes by name); they carry the same values, the same shared flavour lists, structures, contexts and
 * locator prefixes as the rows were given, and the allocator's lock keys. Context ids are the ids
 * of the rows' sources: two sources may share a context object, which then has two ids.
 */
import type { Prefix } from "../net/prefix.js";
import { toWords } from "../net/uint128.js";
import { grownColumn } from "../sid/columns.js";
import { FLAVOR_BIT, PackedSidTable } from "../sid/packed.js";
import type { LocatorEntry, SidContext, SidStructure } from "../sid/table.js";

/** What every SID of one behaviour, flavour list and layout shares (made once per layout). */
export interface RowShape {
  readonly behavior: string;
  readonly flavors: readonly string[];
  readonly codepoint: number | undefined;
  readonly structure: SidStructure;
}

/**
 * What the SID is made for (the allocator's spec): its context, and its id, its place in the list
 * of sources the sink is given. The table's context column holds these ids, and the SID's key is
 * asked of the allocator (`keyOf`) only when an entry is made.
 */
export interface RowSource {
  readonly context: SidContext;
  readonly rowId?: number;
}

/** One SID on its way into the table. */
export interface SidRow {
  w0: number;
  w1: number;
  w2: number;
  w3: number;
  algorithm: number;
  shape: RowShape;
  fn: bigint;
  source: RowSource;
  /** The locator the SID is carved from (one of its node's locators, or an anycast group's). */
  locator: LocatorEntry;
}

/** Ids of a shape's parts in the table being built. */
interface ShapeIds {
  readonly behavior: number;
  readonly flavorSet: number;
  readonly mask: number;
  readonly codepoint: number;
  readonly structure: number;
}

const TWO53 = 2n ** 53n;
const NO_SOURCE: RowSource = { context: {}, rowId: -1 };

/** Row order within a node: address, then algorithm, then behaviour name. */
function rowOrder(a: SidRow, b: SidRow): number {
  return (
    a.w0 - b.w0 ||
    a.w1 - b.w1 ||
    a.w2 - b.w2 ||
    a.w3 - b.w3 ||
    a.algorithm - b.algorithm ||
    (a.shape.behavior < b.shape.behavior ? -1 : a.shape.behavior > b.shape.behavior ? 1 : 0)
  );
}

/** Rows up to this many are sorted by insertion (a node's rows come nearly in order; Array.prototype.sort makes a copy per call). */
const INSERTION_ROWS = 256;

/** Sort `rows` by rowOrder, as rows.sort(rowOrder) does (both sorts are stable). */
export function sortRows(rows: SidRow[]): void {
  const n = rows.length;
  if (n > INSERTION_ROWS) {
    rows.sort(rowOrder);
    return;
  }
  for (let i = 1; i < n; i++) {
    const r = rows[i]!;
    let j = i - 1;
    if (rowOrder(rows[j]!, r) <= 0) continue;
    while (j >= 0 && rowOrder(rows[j]!, r) > 0) {
      rows[j + 1] = rows[j]!;
      j--;
    }
    rows[j + 1] = r;
  }
}

export class SidRowSink {
  private capacity = 0;
  private count = 0;
  private w0 = new Uint32Array(0);
  private w1 = new Uint32Array(0);
  private w2 = new Uint32Array(0);
  private w3 = new Uint32Array(0);
  private node = new Int32Array(0);
  private locator = new Int32Array(0);
  private behavior = new Int32Array(0);
  private flavorSet = new Int32Array(0);
  private flavorMask = new Uint8Array(0);
  private codepoint = new Float64Array(0);
  private algorithm = new Int32Array(0);
  private fn = new Float64Array(0);
  private structure = new Int32Array(0);
  private context = new Int32Array(0);
  private readonly bigFunctions = new Map<number, bigint>();

  private readonly nodeNames: string[] = [];
  private readonly behaviors: string[] = [];
  private readonly behaviorIds = new Map<string, number>();
  private readonly flavorSets: (readonly string[])[] = [];
  private readonly flavorIds = new Map<readonly string[], number>();
  private readonly structures: SidStructure[] = [];
  private readonly structureIds = new Map<SidStructure, number>();
  private readonly shapeIds = new Map<RowShape, ShapeIds>();
  /** Locators, in order: owning node and entry; prefixes interned by value. */
  private readonly locNodes: number[] = [];
  private readonly locEntries: LocatorEntry[] = [];
  private readonly locPrefixIds: number[] = [];
  private readonly prefixes: Prefix[] = [];
  private readonly prefixIds = new Map<string, number>();
  private readonly prefixObjects = new Map<Prefix, number>();

  /** Rows handed out by `row()`, reused once their node is written. */
  private readonly pool: SidRow[] = [];
  private used = 0;

  /**
   * `sources`: every source a row may name, each at its rowId. `keyOf` gives the key of a SID
   * (SidEntry.key) from its source and algorithm.
   */
  constructor(
    private readonly plan: string,
    private readonly sources: readonly RowSource[],
    private readonly keyOf: (source: RowSource, algorithm: number) => string,
  ) {}

  /** A row to fill (reused after the next writeNode; `keep` gives one of its own, for anycast groups shared by several nodes). */
  row(keep = false): SidRow {
    if (!keep && this.used < this.pool.length) return this.pool[this.used++]!;
    const r: SidRow = { w0: 0, w1: 0, w2: 0, w3: 0, algorithm: 0, shape: undefined as unknown as RowShape, fn: 0n, source: NO_SOURCE, locator: undefined as unknown as LocatorEntry };
    if (!keep) {
      this.pool.push(r);
      this.used++;
    }
    return r;
  }

  /** Append one node: its locators as given (already in table order) and its rows, sorted. */
  writeNode(name: string, locators: readonly LocatorEntry[], rows: SidRow[]): void {
    const nodeId = this.nodeNames.length;
    this.nodeNames.push(name);
    const locIds = new Map<LocatorEntry, number>();
    for (let k = 0; k < locators.length; k++) {
      const l = locators[k]!;
      const id = this.locEntries.length;
      this.locNodes.push(nodeId);
      this.locEntries.push(l);
      this.locPrefixIds.push(this.prefixId(l.prefix));
      if (!locIds.has(l)) locIds.set(l, id);
    }
    sortRows(rows);
    this.reserve(this.count + rows.length);
    let lastLoc: LocatorEntry | undefined;
    let lastLocId = -1;
    // neighbouring rows mostly share a shape (a node's End.X SIDs, its VRFs' SIDs)
    let lastShape: RowShape | undefined;
    let ids: ShapeIds | undefined;
    for (let k = 0; k < rows.length; k++) {
      const r = rows[k]!;
      const i = this.count++;
      this.w0[i] = r.w0;
      this.w1[i] = r.w1;
      this.w2[i] = r.w2;
      this.w3[i] = r.w3;
      this.node[i] = nodeId;
      if (r.locator !== lastLoc) {
        lastLoc = r.locator;
        lastLocId = locIds.get(r.locator) ?? this.unlistedLocator(nodeId, r.locator, locIds);
      }
      this.locator[i] = lastLocId;
      if (ids === undefined || r.shape !== lastShape) ids = this.idsOf((lastShape = r.shape));
      this.behavior[i] = ids.behavior;
      this.flavorSet[i] = ids.flavorSet;
      this.flavorMask[i] = ids.mask;
      this.codepoint[i] = ids.codepoint;
      this.structure[i] = ids.structure;
      this.algorithm[i] = r.algorithm;
      if (r.fn < TWO53) this.fn[i] = Number(r.fn);
      else {
        this.fn[i] = NaN;
        this.bigFunctions.set(i, r.fn);
      }
      this.context[i] = r.source.rowId!;
    }
    this.used = 0;
  }

  /** The table: SIDs node by node in the order written. */
  finish(): PackedSidTable {
    const n = this.count;
    const p = new PackedSidTable(this.plan, n, 0);
    // the sink is not used again: its columns become the table's
    p.adoptColumns({ w0: this.w0, w1: this.w1, w2: this.w2, w3: this.w3, node: this.node, locator: this.locator, behavior: this.behavior, flavorSet: this.flavorSet, flavorMask: this.flavorMask, codepoint: this.codepoint, algorithm: this.algorithm, fn: this.fn, structure: this.structure, context: this.context });
    p.nodeNames.push(...this.nodeNames);
    p.behaviors.push(...this.behaviors);
    p.flavorSets.push(...this.flavorSets);
    p.structures.push(...this.structures);
    for (const [i, f] of this.bigFunctions) p.bigFunctions.set(i, f);
    const prefixIds = this.prefixes.map((pr) => p.addPrefix(pr));
    for (let id = 0; id < this.locEntries.length; id++) {
      const l = this.locEntries[id]!;
      const got = p.addLocator(this.locNodes[id]!, l.algorithm, prefixIds[this.locPrefixIds[id]!]!);
      p.setLocatorEntry(got, l);
    }
    for (const id of this.unlisted) p.unlisted.add(id);
    // (indexed loops: this runs once per table, often before the loop is optimised, where an
    // iterator would make an object per step)
    const sources = this.sources;
    for (let k = 0; k < sources.length; k++) p.pushContextObject(sources[k]!.context);
    const keyOf = this.keyOf;
    const context = p.context;
    const algorithm = p.algorithm;
    p.useKeys((i) => keyOf(sources[context[i]!]!, algorithm[i]!));
    return p;
  }

  private readonly unlisted: number[] = [];

  /** A row whose locator its node does not list (cannot happen in an allocation; kept as packTable keeps it). */
  private unlistedLocator(nodeId: number, l: LocatorEntry, locIds: Map<LocatorEntry, number>): number {
    const id = this.locEntries.length;
    this.locNodes.push(nodeId);
    this.locEntries.push(l);
    this.locPrefixIds.push(this.prefixId(l.prefix));
    this.unlisted.push(id);
    locIds.set(l, id);
    return id;
  }

  private prefixId(pr: Prefix): number {
    let id = this.prefixObjects.get(pr);
    if (id !== undefined) return id;
    const [a, b, c, d] = toWords(pr.addr);
    const k = `${pr.len}|${a}|${b}|${c}|${d}`;
    id = this.prefixIds.get(k);
    if (id === undefined) {
      id = this.prefixes.length;
      this.prefixes.push(pr);
      this.prefixIds.set(k, id);
    }
    this.prefixObjects.set(pr, id);
    return id;
  }

  private idsOf(shape: RowShape): ShapeIds {
    let ids = this.shapeIds.get(shape);
    if (ids === undefined) {
      let behavior = this.behaviorIds.get(shape.behavior);
      if (behavior === undefined) {
        behavior = this.behaviors.length;
        this.behaviors.push(shape.behavior);
        this.behaviorIds.set(shape.behavior, behavior);
      }
      let flavorSet = this.flavorIds.get(shape.flavors);
      if (flavorSet === undefined) {
        // equal lists share an id, as packTable gives them
        const text = JSON.stringify(shape.flavors);
        flavorSet = this.flavorSets.findIndex((f) => JSON.stringify(f) === text);
        if (flavorSet < 0) {
          flavorSet = this.flavorSets.length;
          this.flavorSets.push(shape.flavors);
        }
        this.flavorIds.set(shape.flavors, flavorSet);
      }
      let structure = this.structureIds.get(shape.structure);
      if (structure === undefined) {
        const st = shape.structure;
        structure = this.structures.findIndex((s) => s.block === st.block && s.node === st.node && s.function === st.function && s.argument === st.argument);
        if (structure < 0) {
          structure = this.structures.length;
          this.structures.push(st);
        }
        this.structureIds.set(st, structure);
      }
      let mask = 0;
      for (const f of shape.flavors) mask |= (FLAVOR_BIT as Record<string, number>)[f] ?? FLAVOR_BIT.other;
      ids = { behavior, flavorSet, mask, codepoint: shape.codepoint ?? NaN, structure };
      this.shapeIds.set(shape, ids);
    }
    return ids;
  }

  /** Make room for `n` SIDs in all (the allocator counts them first, so the columns are made once). */
  reserve(n: number): void {
    if (n <= this.capacity) return;
    const cap = Math.max(n, this.capacity * 2, 1024);
    const grow = <T extends Uint32Array | Int32Array | Uint8Array | Float64Array>(a: T): T => grownColumn(a, cap);
    this.w0 = grow(this.w0);
    this.w1 = grow(this.w1);
    this.w2 = grow(this.w2);
    this.w3 = grow(this.w3);
    this.node = grow(this.node);
    this.locator = grow(this.locator);
    this.behavior = grow(this.behavior);
    this.flavorSet = grow(this.flavorSet);
    this.flavorMask = grow(this.flavorMask);
    this.codepoint = grow(this.codepoint);
    this.algorithm = grow(this.algorithm);
    this.fn = grow(this.fn);
    this.structure = grow(this.structure);
    this.context = grow(this.context);
    this.capacity = cap;
  }
}

const TWO32 = 2n ** 32n;

/**
 * The address words of a SID into `r`: `words` (the locator's first address `first`, as toWords
 * gives it) with `fn` shifted left by `shift` bits ORed in, i.e. toWords(first | fn << shift),
 * without a bigint for values below 2^32 (tests check it against that expression).
 */
export function setSidWords(r: { w0: number; w1: number; w2: number; w3: number }, words: readonly [number, number, number, number], first: bigint, shift: number, fn: bigint): void {
  if (fn === 0n) {
    r.w0 = words[0];
    r.w1 = words[1];
    r.w2 = words[2];
    r.w3 = words[3];
  } else if (fn > 0n && fn < TWO32) {
    // a value of up to 32 bits lands in at most two words: word `lo` (counted from the bottom) and the one above
    const v = Number(fn);
    const off = shift & 31;
    const lo = shift >>> 5;
    const low = (v << off) >>> 0;
    const high = off === 0 ? 0 : v >>> (32 - off);
    r.w0 = lo === 3 ? (words[0] | low) >>> 0 : lo === 2 ? (words[0] | high) >>> 0 : words[0];
    r.w1 = lo === 2 ? (words[1] | low) >>> 0 : lo === 1 ? (words[1] | high) >>> 0 : words[1];
    r.w2 = lo === 1 ? (words[2] | low) >>> 0 : lo === 0 ? (words[2] | high) >>> 0 : words[2];
    r.w3 = lo === 0 ? (words[3] | low) >>> 0 : words[3];
  } else {
    [r.w0, r.w1, r.w2, r.w3] = toWords(first | (fn << BigInt(shift)));
  }
}
