/**
 * The packed SID table: the same content as a `SidTable`, held column by column in typed arrays
 * (four 32-bit address words, node ids, locator ids, behaviour ids, flavour sets and masks,
 * codepoints, algorithms, structures, rows, interned contexts) so that a million SIDs cost a few
 * tens of bytes each and can be sorted and swept without an object or a bigint per SID.
 *
 * `readCsvPacked` reads our CSV form straight from the file's bytes and gives exactly what
 * `readCsvTable` (table-read.ts, the readable reference) gives: the same SIDs, locators, problems
 * and line numbers (tests compare the two on random tables). The allocator writes its SIDs
 * straight into one (src/alloc/sid-rows.ts); `packTable` packs a `SidTable` that already exists
 * (one built by hand). `radixSortIndex` is the index sort the linter's views use.
 */
import { HEX_DIGIT, parsePrefixBytes, parseWordsBytes } from "../net/fast.js";
import { Prefix } from "../net/prefix.js";
import { formatWords, parseAddr, parsePrefixParts } from "../net/text.js";
import { fromWords, toWords } from "../net/uint128.js";
import { grownColumn } from "./columns.js";
import type { LocatorEntry, NodeTable, SidContext, SidEntry, SidStructure, SidTable } from "./table.js";
import { formatContext, parseContext } from "./table.js";
import { OPTIONAL_COLUMNS, REQUIRED_COLUMNS, type TableProblem, sidKeyFromContext } from "./table-read.js";

/** Bits of `PackedSidTable.flavorMask`: one per flavour the registry knows, and one for any other text. */
export const FLAVOR_BIT = { PSP: 1, USP: 2, USD: 4, "NEXT-CSID": 8, "REPLACE-CSID": 16, other: 128 } as const;

function maskOf(flavors: readonly string[]): number {
  let m = 0;
  for (const f of flavors) m |= (FLAVOR_BIT as Record<string, number>)[f] ?? FLAVOR_BIT.other;
  return m;
}

/** Bigints of small function values, made once (bigints are values: sharing them changes nothing). */
const SMALL_LIMIT = 1 << 16;
const SMALL: bigint[] = [];

const structKey = (s: SidStructure) => `${s.block}/${s.node}/${s.function}/${s.argument}`;

/** The per-SID columns a builder fills (see PackedSidTable.adoptColumns). */
export interface PackedColumns {
  readonly w0: Uint32Array;
  readonly w1: Uint32Array;
  readonly w2: Uint32Array;
  readonly w3: Uint32Array;
  readonly node: Int32Array;
  readonly locator: Int32Array;
  readonly behavior: Int32Array;
  readonly flavorSet: Int32Array;
  readonly flavorMask: Uint8Array;
  readonly codepoint: Float64Array;
  readonly algorithm: Int32Array;
  readonly fn: Float64Array;
  readonly structure: Int32Array;
  readonly context: Int32Array;
}

/**
 * A SID table in columns. Index i (0 .. count-1) is one SID, in the order of the source (rows of a
 * CSV file, or node by node for a packed `SidTable`). Ids index the small tables beside the
 * columns: `nodeNames`, `behaviors`, `flavorSets`, `structures`, contexts, and the locator table
 * (`loc*` columns, one entry per node, algorithm and prefix, in order of first appearance).
 */
export class PackedSidTable {
  /** Address words, most significant first (bit 0 of the address is the top bit of w0). */
  readonly w0: Uint32Array;
  readonly w1: Uint32Array;
  readonly w2: Uint32Array;
  readonly w3: Uint32Array;
  /** Node id of each SID (index into `nodeNames`). */
  readonly node: Int32Array;
  /** Owned-locator id of each SID, or -1 when the SID names no locator. */
  readonly locator: Int32Array;
  readonly behavior: Int32Array;
  /** Id of the SID's flavour list (index into `flavorSets`). */
  readonly flavorSet: Int32Array;
  /** The flavours as bits (see FLAVOR_BIT). */
  readonly flavorMask: Uint8Array;
  /** Codepoint, or NaN when none is given (a float column: a table read from JSON may hold any integer). */
  readonly codepoint: Float64Array;
  /** Algorithm (0..255 from CSV; any integer a JSON table holds). */
  readonly algorithm: Int32Array;
  /** Function value when below 2^53; NaN otherwise (the value is then in `bigFunctions`). */
  readonly fn: Float64Array;
  /** Structure id (index into `structures`), or -1 when none is given. */
  readonly structure: Int32Array;
  /** 1-based row in the source table; 0 when the SID did not come from a file. */
  readonly row: Int32Array;
  /** Context id (see `contextOf`, `contextText`). */
  readonly context: Int32Array;

  /** Locator table: owning node, algorithm and prefix of each owned locator. */
  locatorCount = 0;
  locNode: Int32Array;
  locAlgorithm: Int32Array;
  locPrefix: Int32Array;
  /** Distinct prefixes (as written, host bits kept) with their words and lengths. */
  readonly prefixes: Prefix[] = [];
  pw0: Uint32Array;
  pw1: Uint32Array;
  pw2: Uint32Array;
  pw3: Uint32Array;
  plen: Uint8Array;

  readonly nodeNames: string[] = [];
  readonly behaviors: string[] = [];
  readonly flavorSets: (readonly string[])[] = [];
  readonly structures: SidStructure[] = [];
  readonly bigFunctions = new Map<number, bigint>();
  /**
   * Locator ids that only SIDs name (packTable: a SID's locator missing from its node's list).
   * They are left out of the locator views, as the reference leaves them out.
   */
  readonly unlisted = new Set<number>();

  /** Contexts: as objects (packTable) or as raw text (the CSV reader), resolved lazily. */
  private readonly ctxObjects: (SidContext | undefined)[] = [];
  private readonly ctxTexts: (string | undefined)[] = [];
  /** Where context texts come from when the reader has not decoded them yet. */
  private ctxSource: { readonly size: number; text(id: number): string } | undefined;
  /**
   * Materialised entries (shared by every view of the table), and the source objects when packed
   * from a SidTable: a map while few are made (rules make entries for their findings), a list
   * once many are.
   */
  private entries: (SidEntry | undefined)[] | undefined;
  private entryMap: Map<number, SidEntry> | undefined;
  private readonly locEntries: (LocatorEntry | undefined)[] = [];
  private rankCache: Int32Array | undefined;
  /** Parts of SidEntry.key, per context id and per flavour-set id (see keyOf). */
  private readonly keyCtx: (string | undefined)[] = [];
  private readonly keyFlv: (string | undefined)[] = [];
  private tableCache: SidTable | undefined;
  private rowsCache: { readonly order: Int32Array | undefined; readonly start: Int32Array } | undefined;
  /** Listed locator ids of each node (see freshNode). */
  private locsByNode: number[][] | undefined;
  /**
   * SidEntry.key of each SID when the builder gives its own (the allocator's lock keys); the keys
   * are otherwise made from the context (see keyOf).
   */
  private sidKeys: ((i: number) => string) | undefined;

  constructor(
    readonly plan: string,
    public count: number,
    capacity: number,
  ) {
    this.w0 = new Uint32Array(capacity);
    this.w1 = new Uint32Array(capacity);
    this.w2 = new Uint32Array(capacity);
    this.w3 = new Uint32Array(capacity);
    this.node = new Int32Array(capacity);
    this.locator = new Int32Array(capacity);
    this.behavior = new Int32Array(capacity);
    this.flavorSet = new Int32Array(capacity);
    this.flavorMask = new Uint8Array(capacity);
    this.codepoint = new Float64Array(capacity);
    this.algorithm = new Int32Array(capacity);
    this.fn = new Float64Array(capacity);
    this.structure = new Int32Array(capacity);
    this.row = new Int32Array(capacity);
    this.context = new Int32Array(capacity);
    this.locNode = new Int32Array(64);
    this.locAlgorithm = new Int32Array(64);
    this.locPrefix = new Int32Array(64);
    this.pw0 = new Uint32Array(64);
    this.pw1 = new Uint32Array(64);
    this.pw2 = new Uint32Array(64);
    this.pw3 = new Uint32Array(64);
    this.plen = new Uint8Array(64);
  }

  /** The address of SID i as a bigint. */
  sidAt(i: number): bigint {
    return fromWords(this.w0[i]!, this.w1[i]!, this.w2[i]!, this.w3[i]!);
  }

  /** The address of SID i in RFC 5952 text. */
  formatSid(i: number): string {
    return formatWords(this.w0[i]!, this.w1[i]!, this.w2[i]!, this.w3[i]!);
  }

  /** The function value of SID i. */
  functionAt(i: number): bigint {
    const f = this.fn[i]!;
    if (f < SMALL_LIMIT) return SMALL[f] ?? (SMALL[f] = BigInt(f));
    return Number.isNaN(f) ? this.bigFunctions.get(i)! : BigInt(f);
  }

  /** Name of the node of SID i. */
  nodeOf(i: number): string {
    return this.nodeNames[this.node[i]!]!;
  }

  /** Number of distinct contexts. */
  get contextCount(): number {
    return Math.max(this.ctxObjects.length, this.ctxTexts.length, this.ctxSource?.size ?? 0);
  }

  /** The context with id `id` as key/value pairs (made once per id and shared). */
  contextOf(id: number): SidContext {
    let c = this.ctxObjects[id];
    if (c === undefined) {
      c = parseContext(this.contextText(id)) ?? {};
      this.ctxObjects[id] = c;
    }
    return c;
  }

  /** The context with id `id` as `k=v;k=v` text (as written in a CSV file; keys sorted for packed tables). */
  contextText(id: number): string {
    let t = this.ctxTexts[id];
    if (t === undefined) {
      const o = this.ctxObjects[id];
      t = o !== undefined ? formatContext(o) : (this.ctxSource?.text(id) ?? "");
      this.ctxTexts[id] = t;
    }
    return t;
  }

  /** Rank of each node id when the names are sorted (equal names share a rank). */
  get nodeRank(): Int32Array {
    if (!this.rankCache) {
      const names = this.nodeNames;
      const ids = names.map((_, i) => i).sort((a, b) => (names[a]! < names[b]! ? -1 : names[a]! > names[b]! ? 1 : a - b));
      const rank = new Int32Array(names.length);
      let r = -1;
      for (let k = 0; k < ids.length; k++) {
        if (k === 0 || names[ids[k]!] !== names[ids[k - 1]!]) r++;
        rank[ids[k]!] = r;
      }
      this.rankCache = rank;
    }
    return this.rankCache;
  }

  /** SID i as a SidEntry object, made once and shared (the source object when packed from a table). */
  entry(i: number): SidEntry {
    let e = this.entries !== undefined ? this.entries[i] : this.entryMap?.get(i);
    if (e === undefined) {
      e = this.makeEntry(i);
      this.setEntry(i, e);
    }
    return e;
  }

  /** SID i as a new SidEntry object (entry() keeps the one it makes). */
  private makeEntry(i: number): SidEntry {
    const behavior = this.behaviors[this.behavior[i]!]!;
    const flavors = this.flavorSets[this.flavorSet[i]!]!;
    const algorithm = this.algorithm[i]!;
    const context = this.contextOf(this.context[i]!);
    const cp = this.codepoint[i]!;
    const loc = this.locator[i]!;
    const st = this.structure[i]!;
    const row = this.row[i]!;
    const sid = this.sidAt(i);
    const codepoint = Number.isNaN(cp) ? undefined : cp;
    const locator = loc < 0 ? undefined : this.prefixes[this.locPrefix[loc]!];
    const fn = this.functionAt(i);
    const structure = st < 0 ? undefined : this.structures[st];
    const key = this.sidKeys !== undefined ? this.sidKeys(i) : this.keyOf(i, behavior, algorithm);
    return row > 0
      ? { sid, behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key, row }
      : { sid, behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key };
  }

  /**
   * SidEntry.key of SID i: sidKeyFromContext(behavior, flavors, algorithm, context), with its
   * context and flavour parts made once per id (taken from sidKeyFromContext itself).
   */
  private keyOf(i: number, behavior: string, algorithm: number): string {
    const c = this.context[i]!;
    let ctx = this.keyCtx[c];
    if (ctx === undefined) {
      ctx = sidKeyFromContext("", [], 0, this.contextOf(c)).slice("0|||".length);
      this.keyCtx[c] = ctx;
    }
    let flv = "";
    if (behavior === "End") {
      const f = this.flavorSet[i]!;
      flv = this.keyFlv[f] ?? (this.keyFlv[f] = sidKeyFromContext("End", this.flavorSets[f]!, 0, {}).slice("0|End|".length, -1));
    }
    return `${algorithm}|${behavior}|${flv}|${ctx}`;
  }

  /** Locator `id` as a LocatorEntry (made once; the source object when packed from a table). */
  locatorEntry(id: number): LocatorEntry {
    let l = this.locEntries[id];
    if (l === undefined) {
      l = { prefix: this.prefixes[this.locPrefix[id]!]!, algorithm: this.locAlgorithm[id]!, block: "", anycast: "" };
      this.locEntries[id] = l;
    }
    return l;
  }

  /**
   * Rows of the table grouped by node, each node's in table order: rows `order[start[id]] ..
   * order[start[id + 1] - 1]`. `order` is left out when the rows already come node by node in id
   * order (an allocation's): the positions are then the rows. Made once.
   */
  nodeRows(): { readonly order: Int32Array | undefined; readonly start: Int32Array } {
    if (this.rowsCache) return this.rowsCache;
    const nodes = this.nodeNames.length;
    const start = new Int32Array(nodes + 1);
    const node = this.node;
    let grouped = true;
    for (let i = 0; i < this.count; i++) {
      const id = node[i]!;
      start[id + 1]!++;
      if (i > 0 && id < node[i - 1]!) grouped = false;
    }
    for (let id = 0; id < nodes; id++) start[id + 1]! += start[id]!;
    let order: Int32Array | undefined;
    if (!grouped) {
      const at = start.slice(0, nodes);
      order = new Int32Array(this.count);
      for (let i = 0; i < this.count; i++) order[at[node[i]!]!++] = i;
    }
    this.rowsCache = { order, start };
    return this.rowsCache;
  }

  /**
   * Node `id` as a NodeTable, its SID objects made for the occasion and not kept (the table's own
   * when they exist already): for writing a large table node by node without holding an object
   * per SID. The same content as toTable's node.
   */
  freshNode(id: number): NodeTable {
    const { order, start } = this.nodeRows();
    const sids: SidEntry[] = [];
    for (let k = start[id]!; k < start[id + 1]!; k++) {
      const i = order === undefined ? k : order[k]!;
      sids.push(this.tableCache !== undefined || this.entries !== undefined ? this.entry(i) : this.makeEntry(i));
    }
    let locs = this.locsByNode;
    if (locs === undefined) {
      locs = this.locsByNode = Array.from({ length: this.nodeNames.length }, () => []);
      for (let l = 0; l < this.locatorCount; l++) if (!this.unlisted.has(l)) locs[this.locNode[l]!]!.push(l);
    }
    return { node: this.nodeNames[id]!, locators: locs[id]!.map((l) => this.locatorEntry(l)), sids };
  }

  /** Node ids in the order of toTable's nodes: by name (equal names in id order). */
  nodeIdsByName(): number[] {
    const rank = this.nodeRank;
    return this.nodeNames.map((_, i) => i).sort((a, b) => rank[a]! - rank[b]! || a - b);
  }

  /**
   * The table as a SidTable: nodes sorted by name, each with its locators in order of first
   * appearance and its SIDs in source order. Made once.
   */
  toTable(): SidTable {
    if (this.tableCache) return this.tableCache;
    const n = this.nodeNames.length;
    const sids: SidEntry[][] = Array.from({ length: n }, () => []);
    const locs: LocatorEntry[][] = Array.from({ length: n }, () => []);
    for (let id = 0; id < this.locatorCount; id++) if (!this.unlisted.has(id)) locs[this.locNode[id]!]!.push(this.locatorEntry(id));
    for (let i = 0; i < this.count; i++) sids[this.node[i]!]!.push(this.entry(i));
    const order = this.nodeIdsByName();
    const nodes: NodeTable[] = order.map((i) => ({ node: this.nodeNames[i]!, locators: locs[i]!, sids: sids[i]! }));
    this.tableCache = { plan: this.plan, nodes };
    return this.tableCache;
  }

  // ---- building (used by the reader and packTable)

  /** @internal */
  setEntry(i: number, e: SidEntry): void {
    if (this.entries !== undefined) {
      this.entries[i] = e;
      return;
    }
    const m = (this.entryMap ??= new Map());
    m.set(i, e);
    if (m.size > 64 && m.size * 16 > this.count) {
      // many entries: a list, filled from the map
      const list: (SidEntry | undefined)[] = [];
      for (let k = 0; k < this.count; k++) list.push(m.get(k));
      this.entries = list;
      this.entryMap = undefined;
    }
  }

  /** @internal The SIDs' keys as a builder gives them (the allocator's lock keys), made when an entry is. */
  useKeys(keys: (i: number) => string): void {
    this.sidKeys = keys;
  }

  /**
   * @internal Take over columns a builder filled (SidRowSink): each is cut to `count` entries
   * (a view, not a copy). The row column is all zeros (no SID came from a file).
   */
  adoptColumns(cols: PackedColumns): void {
    const n = this.count;
    const self = this as unknown as Record<keyof PackedColumns | "row", ArrayLike<number>>;
    for (const k of Object.keys(cols) as (keyof PackedColumns)[]) self[k] = cols[k].subarray(0, n);
    self.row = new Int32Array(n);
  }

  /** @internal */
  setLocatorEntry(id: number, l: LocatorEntry): void {
    this.locEntries[id] = l;
  }

  /** @internal */
  pushContextObject(c: SidContext): void {
    this.ctxObjects.push(c);
  }

  /** @internal */
  setContextSource(src: { readonly size: number; text(id: number): string }): void {
    this.ctxSource = src;
  }

  /** @internal add a distinct prefix; returns its id */
  addPrefix(p: Prefix): number {
    const [a, b, c, d] = toWords(p.addr);
    return this.pushPrefix(p, a, b, c, d);
  }

  /** @internal add a distinct prefix given by its words and length; returns its id */
  addPrefixWords(w0: number, w1: number, w2: number, w3: number, len: number): number {
    return this.pushPrefix(new Prefix(fromWords(w0, w1, w2, w3), len), w0, w1, w2, w3);
  }

  private pushPrefix(p: Prefix, a: number, b: number, c: number, d: number): number {
    const id = this.prefixes.length;
    if (id >= this.plen.length) {
      const grow = <T extends Uint32Array | Uint8Array>(a: T): T => grownColumn(a, a.length * 2);
      this.pw0 = grow(this.pw0);
      this.pw1 = grow(this.pw1);
      this.pw2 = grow(this.pw2);
      this.pw3 = grow(this.pw3);
      this.plen = grow(this.plen);
    }
    this.pw0[id] = a;
    this.pw1[id] = b;
    this.pw2[id] = c;
    this.pw3[id] = d;
    this.plen[id] = p.len;
    this.prefixes.push(p);
    return id;
  }

  /** @internal add an owned locator; returns its id */
  addLocator(node: number, algorithm: number, prefix: number): number {
    const id = this.locatorCount++;
    if (id >= this.locNode.length) {
      const ln = new Int32Array(this.locNode.length * 2);
      ln.set(this.locNode);
      this.locNode = ln;
      const la = new Int32Array(this.locAlgorithm.length * 2);
      la.set(this.locAlgorithm);
      this.locAlgorithm = la;
      const lp = new Int32Array(this.locPrefix.length * 2);
      lp.set(this.locPrefix);
      this.locPrefix = lp;
    }
    this.locNode[id] = node;
    this.locAlgorithm[id] = algorithm;
    this.locPrefix[id] = prefix;
    return id;
  }

  /** @internal */
  internStructure(s: SidStructure, cache: Map<string, number>): number {
    const k = structKey(s);
    let id = cache.get(k);
    if (id === undefined) {
      id = this.structures.length;
      this.structures.push(s);
      cache.set(k, id);
    }
    return id;
  }
}

/** The result of reading a CSV table into columns; mirrors ReadTableResult. */
export interface PackedReadResult {
  readonly table: PackedSidTable;
  readonly problems: readonly TableProblem[];
  readonly unreadable: boolean;
  readonly lineOf: (row: number) => number | undefined;
}

// ------------------------------------------------------------------ sorting

/**
 * Indices 0..n-1 sorted by the given unsigned 32-bit key columns, most significant first; equal
 * keys keep index order (the sort is stable), so a trailing "index" key is never needed. An LSD
 * radix sort with 16-bit digits; a digit that is the same for every index costs one counting pass
 * and no move. Values are read as `v >>> 0`.
 */
export function radixSortIndex(n: number, keys: readonly ArrayLike<number>[]): Int32Array {
  let idx = new Int32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  if (n < 2) return idx;
  let tmp = new Int32Array(n);
  const count = new Int32Array(65536);
  for (let k = keys.length - 1; k >= 0; k--) {
    const key = keys[k]!;
    for (let shift = 0; shift <= 16; shift += 16) {
      count.fill(0);
      for (let p = 0; p < n; p++) count[((key[idx[p]!]! >>> 0) >>> shift) & 0xffff]!++;
      // skip a digit every index shares
      const d0 = ((key[idx[0]!]! >>> 0) >>> shift) & 0xffff;
      if (count[d0] === n) continue;
      let sum = 0;
      for (let b = 0; b < 65536; b++) {
        const c = count[b]!;
        count[b] = sum;
        sum += c;
      }
      for (let p = 0; p < n; p++) {
        const i = idx[p]!;
        tmp[count[((key[i]! >>> 0) >>> shift) & 0xffff]!++] = i;
      }
      const t = idx;
      idx = tmp;
      tmp = t;
    }
  }
  return idx;
}

/**
 * SID indices in address order, then by node name, then in source order: the order of the
 * linter's `ctx.sids` (engine.ts, `prepare`).
 */
export function sidOrder(t: PackedSidTable): Int32Array {
  const rank = t.nodeRank;
  const nr = new Int32Array(t.count);
  for (let i = 0; i < t.count; i++) nr[i] = rank[t.node[i]!]!;
  return radixSortIndex(t.count, [t.w0.subarray(0, t.count), t.w1.subarray(0, t.count), t.w2.subarray(0, t.count), t.w3.subarray(0, t.count), nr]);
}

/**
 * Locator ids by first address (host bits cleared), then length, then node name, then order of
 * first appearance: the order of the linter's `ctx.locators`.
 */
export function locatorOrder(t: PackedSidTable): Int32Array {
  const order = locatorOrderAll(t);
  if (t.unlisted.size === 0) return order;
  return order.filter((id) => !t.unlisted.has(id));
}

function locatorOrderAll(t: PackedSidTable): Int32Array {
  const n = t.locatorCount;
  const m = [new Uint32Array(n), new Uint32Array(n), new Uint32Array(n), new Uint32Array(n)];
  const len = new Uint32Array(n);
  const nr = new Int32Array(n);
  const rank = t.nodeRank;
  const pw = [t.pw0, t.pw1, t.pw2, t.pw3];
  for (let id = 0; id < n; id++) {
    const p = t.locPrefix[id]!;
    const L = t.plen[p]!;
    for (let k = 0; k < 4; k++) m[k]![id] = maskWord(pw[k]![p]!, L - 32 * k);
    len[id] = L;
    nr[id] = rank[t.locNode[id]!]!;
  }
  return radixSortIndex(n, [m[0]!, m[1]!, m[2]!, m[3]!, len, nr]);
}

/** `w` with only its leading `bits` bits kept (bits <= 0: 0; >= 32: w). */
export function maskWord(w: number, bits: number): number {
  if (bits >= 32) return w >>> 0;
  if (bits <= 0) return 0;
  return (w & ~(0xffffffff >>> bits)) >>> 0;
}

// ------------------------------------------------------------------ packing a SidTable

/**
 * Pack an existing table (one built by hand, or the objects of an allocation). Entries and locators keep their identity:
 * `entry(i)` and `locatorEntry(id)` return the table's own objects, and `toTable()` the table.
 */
export function packTable(t: SidTable): PackedSidTable {
  let count = 0;
  for (const n of t.nodes) count += n.sids.length;
  const p = new PackedSidTable(t.plan, count, count);
  const behaviorIds = new Map<string, number>();
  const flavorIds = new Map<readonly string[], number>();
  const flavorText = new Map<string, number>();
  const structIds = new Map<string, number>();
  const structObj = new Map<SidStructure, number>();
  const ctxIds = new Map<SidContext, number>();
  const prefixIds = new Map<string, number>();
  const prefixObj = new Map<Prefix, number>();
  let i = 0;
  t.nodes.forEach((n, nodeId) => {
    p.nodeNames.push(n.node);
    // this node's locators, by algorithm and prefix (for the SIDs' locator ids); an allocation's
    // SIDs share the Prefix object of their locator, so the object is tried before the value
    const own = new Map<string, number>();
    const ownObj = new Map<Prefix, number>();
    for (const l of n.locators) {
      const id = p.addLocator(nodeId, l.algorithm, prefixId(l.prefix));
      p.setLocatorEntry(id, l);
      const k = `${l.algorithm}|${p.plen[p.locPrefix[id]!]}|${l.prefix.addr}`;
      if (!own.has(k)) own.set(k, id);
    }
    for (const l of n.locators) {
      const id = own.get(`${l.algorithm}|${l.prefix.len}|${l.prefix.addr}`)!;
      if (!ownObj.has(l.prefix) || p.locAlgorithm[ownObj.get(l.prefix)!] !== l.algorithm) ownObj.set(l.prefix, id);
    }
    for (const s of n.sids) {
      const [a, b, c, d] = toWords(s.sid);
      p.w0[i] = a;
      p.w1[i] = b;
      p.w2[i] = c;
      p.w3[i] = d;
      p.node[i] = nodeId;
      let loc = -1;
      if (s.locator) {
        const byObj = ownObj.get(s.locator);
        if (byObj !== undefined && p.locAlgorithm[byObj] === s.algorithm) loc = byObj;
        const k = loc >= 0 ? "" : `${s.algorithm}|${s.locator.len}|${s.locator.addr}`;
        if (loc < 0) loc = own.get(k) ?? -1;
        if (loc < 0) {
          // a SID naming a locator its node does not list: keep it in the table, unlisted
          loc = p.addLocator(nodeId, s.algorithm, prefixId(s.locator));
          p.setLocatorEntry(loc, { prefix: s.locator, algorithm: s.algorithm, block: "", anycast: "" });
          own.set(k, loc);
          p.unlisted.add(loc);
        }
      }
      p.locator[i] = loc;
      let bid = behaviorIds.get(s.behavior);
      if (bid === undefined) {
        bid = p.behaviors.length;
        p.behaviors.push(s.behavior);
        behaviorIds.set(s.behavior, bid);
      }
      p.behavior[i] = bid;
      let fid = flavorIds.get(s.flavors);
      if (fid === undefined) {
        const txt = JSON.stringify(s.flavors);
        fid = flavorText.get(txt);
        if (fid === undefined) {
          fid = p.flavorSets.length;
          p.flavorSets.push(s.flavors);
          flavorText.set(txt, fid);
        }
        flavorIds.set(s.flavors, fid);
      }
      p.flavorSet[i] = fid;
      p.flavorMask[i] = maskOf(s.flavors);
      p.codepoint[i] = s.codepoint ?? NaN;
      p.algorithm[i] = s.algorithm;
      if (s.function < 2n ** 53n && s.function >= 0n) p.fn[i] = Number(s.function);
      else {
        p.fn[i] = NaN;
        p.bigFunctions.set(i, s.function);
      }
      if (s.structure) {
        let sid = structObj.get(s.structure);
        if (sid === undefined) {
          sid = p.internStructure(s.structure, structIds);
          structObj.set(s.structure, sid);
        }
        p.structure[i] = sid;
      } else p.structure[i] = -1;
      p.row[i] = s.row ?? 0;
      let cid = ctxIds.get(s.context);
      if (cid === undefined) {
        cid = ctxIds.size;
        ctxIds.set(s.context, cid);
        p.pushContextObject(s.context);
      }
      p.context[i] = cid;
      p.setEntry(i, s);
      i++;
    }
  });
  (p as unknown as { tableCache: SidTable }).tableCache = t;
  return p;

  function prefixId(pr: Prefix): number {
    let id = prefixObj.get(pr);
    if (id !== undefined) return id;
    const k = `${pr.len}|${pr.addr}`;
    id = prefixIds.get(k);
    if (id === undefined) {
      id = p.addPrefix(pr);
      prefixIds.set(k, id);
    }
    prefixObj.set(pr, id);
    return id;
  }
}

// ------------------------------------------------------------------ reading CSV from bytes

/**
 * Interns byte strings; keeps its own copy of each distinct key and decodes it on demand. Ids
 * count up from 0 in order of first appearance. Open addressing with linear probing.
 */
class ByteInterner {
  /** Probe table, four numbers a slot: hash, id + 1 (0 = empty), start in the store, length. */
  private slots: Int32Array;
  private starts: Int32Array;
  private lens: Int32Array;
  private store: Uint8Array;
  private storeView: DataView;
  private used = 0;
  size = 0;
  private readonly texts: (string | undefined)[] = [];

  /** Where in `file` the key last asked for by internCell stands, and its id (lastS < 0: none). */
  private lastS = -1;
  private lastE = -1;
  private lastId = -1;

  /**
   * Room for about `keys` keys of `bytes` bytes in all before anything grows. Growing costs a
   * rehash (a write to a random place per key); room never used costs address space only, as
   * the pages of a large buffer are only mapped when first written. `file`: the buffer whose
   * cells internCell may remember (it must not change while the interner is in use).
   */
  constructor(
    keys = 512,
    bytes = 4096,
    private readonly file?: Uint8Array,
  ) {
    let slots = 1024;
    while (slots < 2 * keys) slots *= 2;
    this.slots = new Int32Array(4 * slots);
    this.starts = new Int32Array(Math.max(keys, 16));
    this.lens = new Int32Array(Math.max(keys, 16));
    this.store = new Uint8Array(Math.max(bytes, 16));
    this.storeView = new DataView(this.store.buffer);
  }

  /** Id of buf[s..e), adding it when new; `view` is a DataView over the whole of `buf`. */
  intern(buf: Uint8Array, view: DataView, s: number, e: number): number {
    const h = hashBytes(buf, view, s, e);
    const len = e - s;
    const slots = this.slots;
    const mask = (slots.length >> 2) - 1;
    let slot = h & mask;
    for (;;) {
      const o = 4 * slot;
      const v = slots[o + 1]!;
      if (v === 0) break;
      // one cache line holds all a probe needs before the bytes themselves
      if (slots[o] === h && slots[o + 3] === len && sameBytes(this.store, this.storeView, slots[o + 2]!, buf, view, s, len)) return v - 1;
      slot = (slot + 1) & mask;
    }
    const id = this.size++;
    if (id >= this.starts.length) {
      this.starts = growI32(this.starts);
      this.lens = growI32(this.lens);
    }
    if (this.used + len > this.store.length) {
      const st = new Uint8Array(Math.max(this.store.length * 2, this.used + len));
      st.set(this.store.subarray(0, this.used));
      this.store = st;
      this.storeView = new DataView(st.buffer);
    }
    const at = this.used;
    copyBytes(buf, view, s, this.store, this.storeView, at, len);
    this.starts[id] = at;
    this.lens[id] = len;
    this.used += len;
    const o = 4 * slot;
    slots[o] = h;
    slots[o + 1] = id + 1;
    slots[o + 2] = at;
    slots[o + 3] = len;
    if (this.size * 2 > mask + 1) this.rehash();
    return id;
  }

  /**
   * `intern` for a cell of a table, which most often repeats the cell above it: when buf is
   * `file` and holds the same bytes as the key asked for last, its id comes from comparing bytes.
   */
  internCell(buf: Uint8Array, view: DataView, s: number, e: number): number {
    if (buf !== this.file) return this.intern(buf, view, s, e);
    const ps = this.lastS;
    const len = e - s;
    if (ps >= 0 && this.lastE - ps === len && sameBytes(buf, view, ps, buf, view, s, len)) return this.lastId;
    const id = this.intern(buf, view, s, e);
    this.lastS = s;
    this.lastE = e;
    this.lastId = id;
    return id;
  }

  /** The text of id. */
  text(id: number): string {
    let t = this.texts[id];
    if (t === undefined) {
      const s = this.starts[id]!;
      t = decode(this.store, s, s + this.lens[id]!);
      this.texts[id] = t;
    }
    return t;
  }

  /** Done interning: give back the probe table (only `text` works afterwards). */
  seal(): void {
    this.slots = new Int32Array(4);
  }

  private rehash(): void {
    const old = this.slots;
    const slots = new Int32Array(old.length * 2);
    const mask = (slots.length >> 2) - 1;
    for (let o = 0; o < old.length; o += 4) {
      if (old[o + 1] === 0) continue;
      let slot = old[o]! & mask;
      while (slots[4 * slot + 1] !== 0) slot = (slot + 1) & mask;
      const p = 4 * slot;
      slots[p] = old[o]!;
      slots[p + 1] = old[o + 1]!;
      slots[p + 2] = old[o + 2]!;
      slots[p + 3] = old[o + 3]!;
    }
    this.slots = slots;
  }
}

/**
 * A 32-bit hash of buf[s..e): four bytes a step, read through `view` (a DataView over `buf`) as
 * one little-endian word (one multiply per word, not per byte), then MurmurHash3's final mix so
 * that every byte reaches the low bits the slots use.
 */
function hashBytes(buf: Uint8Array, view: DataView, s: number, e: number): number {
  let h = e - s;
  let k = s;
  for (; k + 4 <= e; k += 4) {
    h = Math.imul(h ^ view.getInt32(k, true), 0x9e3779b1);
    h ^= h >>> 15;
  }
  for (; k < e; k++) h = Math.imul(h ^ buf[k]!, 0x9e3779b1);
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  return h ^ (h >>> 16);
}

/**
 * Cell ranges of the quote-free line buf[s..e) split at its commas, into cs/ce; the number of
 * cells, or -1 when cs/ce are too short. Four bytes are tested at once, read through `view` (a
 * DataView over `buf`): a zero-byte test on the word XOR ",,,," flags the comma bytes. Sets
 * `splitPlain` when no cell has an edge trimCells would change.
 */
function splitCommas(buf: Uint8Array, view: DataView, s: number, e: number, cs: Int32Array, ce: Int32Array): number {
  const max = cs.length;
  let cells = 0;
  let from = s;
  let odd = 0;
  let k = s;
  for (; k + 4 <= e; k += 4) {
    const x = view.getInt32(k, true) ^ 0x2c2c2c2c;
    // bit 7 of each byte of m: that byte of x is zero (exact: no carry crosses a byte)
    let m = ~(((x & 0x7f7f7f7f) + 0x7f7f7f7f) | x | 0x7f7f7f7f);
    while (m !== 0) {
      const j = k + ((31 - Math.clz32(m & -m)) >> 3);
      m &= m - 1;
      if (cells === max) return -1;
      if (j > from) odd |= oddEdges(buf[from]!, buf[j - 1]!);
      cs[cells] = from;
      ce[cells++] = j;
      from = j + 1;
    }
  }
  for (; k < e; k++) {
    if (buf[k] !== 44) continue;
    if (cells === max) return -1;
    if (k > from) odd |= oddEdges(buf[from]!, buf[k - 1]!);
    cs[cells] = from;
    ce[cells++] = k;
    from = k + 1;
  }
  if (cells === max) return -1;
  if (e > from) odd |= oddEdges(buf[from]!, buf[e - 1]!);
  cs[cells] = from;
  ce[cells++] = e;
  splitPlain = odd === 0;
  return cells;
}

/** Set by splitCommas: no cell of the line it split needs trimming. */
let splitPlain = false;

/** 0 when a cell from byte `first` to byte `last` is printable ASCII at both edges and starts with no ' (trimCells leaves it as it is), else 1. */
const oddEdges = (first: number, last: number) => (first > 32 && first < 127 && first !== 39 && last > 32 && last < 127 ? 0 : 1);

/** True when a[as..as+len) and b[bs..bs+len) hold the same bytes (aView, bView: DataViews over a and b). */
function sameBytes(a: Uint8Array, aView: DataView, as: number, b: Uint8Array, bView: DataView, bs: number, len: number): boolean {
  let k = 0;
  for (; k + 4 <= len; k += 4) if (aView.getInt32(as + k) !== bView.getInt32(bs + k)) return false;
  for (; k < len; k++) if (a[as + k] !== b[bs + k]) return false;
  return true;
}

/** Copy from[fs..fs+len) to to[ts..) (fromView, toView: DataViews over them). */
function copyBytes(from: Uint8Array, fromView: DataView, fs: number, to: Uint8Array, toView: DataView, ts: number, len: number): void {
  let k = 0;
  for (; k + 4 <= len; k += 4) toView.setInt32(ts + k, fromView.getInt32(fs + k));
  for (; k < len; k++) to[ts + k] = from[fs + k]!;
}

function growU8(a: Uint8Array): Uint8Array<ArrayBuffer> {
  const b = new Uint8Array(a.length * 2);
  b.set(a);
  return b;
}

function growI32(a: Int32Array): Int32Array<ArrayBuffer> {
  const b = new Int32Array(a.length * 2);
  b.set(a);
  return b;
}

const utf8 = new TextDecoder("utf-8");

/** Text of buf[s..e) (UTF-8). */
function decode(buf: Uint8Array, s: number, e: number): string {
  if (e - s <= 32) {
    let ascii = true;
    for (let k = s; k < e; k++) if (buf[k]! >= 0x80) ascii = false;
    if (ascii) return String.fromCharCode.apply(null, buf.subarray(s, e) as unknown as number[]);
  }
  return utf8.decode(buf.subarray(s, e));
}

/**
 * Per BMP code point, 1 when String.prototype.trim removes it: made once, from trim itself, the
 * first time a cell has a non-ASCII byte at an edge.
 */
let trimSpace: Uint8Array | undefined;

function isTrimSpace(cp: number): boolean {
  if (!trimSpace) {
    trimSpace = new Uint8Array(65536);
    for (let c = 0; c < 65536; c++) if (String.fromCharCode(c).trim() === "") trimSpace[c] = 1;
  }
  return cp < 65536 && trimSpace[cp] === 1;
}

/** The code point of the UTF-8 sequence buf[s..e) when it is exactly one of two or three bytes, else -1. */
function codePointOf(buf: Uint8Array, s: number, e: number): number {
  const b = buf[s]!;
  if (e - s === 2 && b >= 0xc2 && b < 0xe0) return ((b & 0x1f) << 6) | (buf[s + 1]! & 0x3f);
  if (e - s === 3 && b >= 0xe0 && b < 0xf0) return ((b & 0x0f) << 12) | ((buf[s + 1]! & 0x3f) << 6) | (buf[s + 2]! & 0x3f);
  return -1;
}

/** Length of the UTF-8 sequence that starts with byte b (1 for a stray continuation byte). */
const seqLength = (b: number) => (b >= 0xf0 ? 4 : b >= 0xe0 ? 3 : b >= 0xc0 ? 2 : 1);

/**
 * Trim cells 0..cells-1 (ranges cs/ce into buf) in place, as `unneutralize(cell.trim())` in the
 * reference: the spaces String.prototype.trim removes (ASCII ones here, the Unicode ones decoded
 * from their UTF-8 at the edges), then our formula guard (a ' before =, +, -, @, tab or CR). The
 * trimmed text of valid UTF-8 is always a range of its bytes.
 */
function trimCells(buf: Uint8Array, cs: Int32Array, ce: Int32Array, cells: number): void {
  for (let k = 0; k < cells; k++) {
    let s = cs[k]!;
    let e = ce[k]!;
    if (s === e) continue;
    if (oddEdges(buf[s]!, buf[e - 1]!) === 0) continue;
    for (;;) {
      while (s < e && isAsciiSpace(buf[s]!)) s++;
      if (s === e || buf[s]! < 0x80) break;
      const len = seqLength(buf[s]!);
      if (s + len > e || !isTrimSpace(codePointOf(buf, s, s + len))) break;
      s += len;
    }
    for (;;) {
      while (e > s && isAsciiSpace(buf[e - 1]!)) e--;
      if (e === s || buf[e - 1]! < 0x80) break;
      let p = e - 1;
      while (p > s && e - p < 3 && (buf[p]! & 0xc0) === 0x80) p--;
      if (!isTrimSpace(codePointOf(buf, p, e))) break;
      e = p;
    }
    if (e - s > 1 && buf[s] === 39) {
      const c1 = buf[s + 1]!;
      if (c1 === 61 || c1 === 43 || c1 === 45 || c1 === 64 || c1 === 9 || c1 === 13) s++;
    }
    cs[k] = s;
    ce[k] = e;
  }
}

/**
 * parseContext's test on bytes: empty, or every ';'-separated part has an '=' after at least one
 * character. (The value is already trimmed, so "only spaces" cannot occur.)
 */
function contextBytesValid(buf: Uint8Array, s: number, e: number): boolean {
  if (s === e) return true;
  for (let ps = s; ; ) {
    // the part from ps to the next ';' (or the end): its first '=' must follow a character
    let k = ps;
    while (k < e && buf[k] !== 59 /* ; */ && buf[k] !== 61 /* = */) k++;
    if (k === ps || k === e || buf[k] === 59) return false;
    while (k < e && buf[k] !== 59) k++;
    if (k === e) return true;
    ps = k + 1;
  }
}

/**
 * The line of each row (0 the header, then the data rows in order), kept as runs: rows whose line
 * is their number plus the same offset (no blank line, comment or line break in a cell between
 * them) share one entry.
 */
class RowLines {
  private firstRow = new Int32Array(16);
  private offset = new Int32Array(16);
  private runs = 0;

  /** Row r, the row after the last one noted (0 at first), stands at `line`. */
  note(r: number, line: number): void {
    const d = line - r;
    if (this.runs > 0 && this.offset[this.runs - 1] === d) return;
    if (this.runs === this.firstRow.length) {
      this.firstRow = growI32(this.firstRow);
      this.offset = growI32(this.offset);
    }
    this.firstRow[this.runs] = r;
    this.offset[this.runs++] = d;
  }

  /** The line of row r (one of the rows noted). */
  lineOf(r: number): number | undefined {
    if (this.runs === 0) return undefined;
    let lo = 0;
    let hi = this.runs - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.firstRow[mid]! <= r) lo = mid;
      else hi = mid - 1;
    }
    return r + this.offset[lo]!;
  }
}

/** ASCII whitespace that String.prototype.trim removes (see trimCells for the others). */
const isAsciiSpace = (c: number) => c === 32 || (c >= 9 && c <= 13);

/** Digits only, 1..maxDigits of them, in buf[s..e): the value, else -1. */
function digitsIn(buf: Uint8Array, s: number, e: number, maxDigits: number): number {
  const len = e - s;
  if (len < 1 || len > maxDigits) return -1;
  let v = 0;
  for (let k = s; k < e; k++) {
    const c = buf[k]!;
    if (c < 48 || c > 57) return -1;
    v = v * 10 + (c - 48);
  }
  return v;
}

/**
 * The function cell buf[s..e) (not empty) as the reference's /^(0[xX][0-9a-fA-F]{1,32}|\d{1,39})$/
 * and BigInt read it: its value when that is a number read exactly here (up to 13 hex or 15
 * decimal digits), -2 when it is a number too long for that (ask BigInt), -1 when it is none.
 */
function functionIn(buf: Uint8Array, s: number, e: number): number {
  const len = e - s;
  if (len >= 3 && buf[s] === 48 && (buf[s + 1] === 120 || buf[s + 1] === 88) && len - 2 <= 32) {
    let v = 0;
    let k = s + 2;
    for (let d: number; k < e && (d = HEX_DIGIT[buf[k]!]!) >= 0; k++) v = v * 16 + d;
    if (k === e) return len - 2 > 13 ? -2 : v;
  }
  if (len > 39) return -1;
  const v = digitsIn(buf, s, e, 39);
  return v < 0 ? -1 : len > 15 ? -2 : v;
}

const ALL_COLUMNS = new Set<string>([...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS]);
const STRUCT_COLUMNS = ["block_bits", "node_bits", "function_bits", "argument_bits"] as const;

/** Where each column is read from: the COL_* numbers index `col` (cell index, or -1 when absent). */
const COLS = ["node", "sid", "behavior", "algorithm", "locator", "flavors", "codepoint", "function", "block_bits", "node_bits", "function_bits", "argument_bits", "context"] as const;
const COL_NODE = 0,
  COL_SID = 1,
  COL_BEHAVIOR = 2,
  COL_ALG = 3,
  COL_LOC = 4,
  COL_FLAV = 5,
  COL_CP = 6,
  COL_FN = 7,
  COL_B = 8,
  COL_CTX = 12;

/**
 * Read a CSV SID table from its bytes (UTF-8; a leading byte-order mark is skipped). Gives the
 * same table, problems and line numbers as `readCsvTable` on the decoded text; the caller checks
 * that the bytes are UTF-8 (the CLI does, with `decodeUtf8` for the message). Nothing is made
 * per row but numbers in columns: texts (nodes, behaviours, flavour lists, locators, contexts)
 * are interned from their bytes, and a string is made once per distinct text, if ever.
 */
export function readCsvPacked(bytes: Uint8Array, plan = ""): PackedReadResult {
  const n = bytes.length;
  // words of the file are read through a DataView (hashing, comparing, splitting four bytes at a time)
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let i0 = 0;
  if (n >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) i0 = 3;
  // capacity: one SID per line at most
  let lineCount = 1;
  for (let p = bytes.indexOf(10, i0); p >= 0; p = bytes.indexOf(10, p + 1)) lineCount++;
  const t = new PackedSidTable(plan, 0, lineCount);
  const problems: TableProblem[] = [];
  const lineOfRow = new RowLines();

  // cell ranges of the record at hand: into the file, or into the scratch buffer of a quoted record
  let cs = new Int32Array(32);
  let ce = new Int32Array(32);
  let scratch = new Uint8Array(1024);
  let scratchView = new DataView(scratch.buffer);
  let scratchUsed = 0;

  let header: string[] | undefined;
  const col = new Int32Array(16).fill(-1);
  let hasStructure = false;
  let row = 0;
  let fatal = false;

  // texts by their bytes; a text that repeats the row before is known by comparing bytes
  const nodeIds = new ByteInterner(512, 4096, bytes);
  const behaviorIds = new ByteInterner(512, 4096, bytes);
  const flavorIds = new ByteInterner(512, 4096, bytes);
  const prefixTexts = new ByteInterner(512, 4096, bytes);
  // contexts: often one for every few rows, so room for one in two rows (up to a million) and
  // their bytes from the start: growing is a rehash, and fresh pages for every table on the way
  const ctxIds = new ByteInterner(Math.min(lineCount >> 1, 1 << 20), n >> 2);
  /** per prefix text id: prefix id (>= 0), or the index of its reason in prefixReasons as -(k + 1) */
  const prefixOfText: number[] = [];
  const prefixReasons: string[] = [];
  /** distinct prefixes by value: 17-byte keys (four words, length) -> prefix id (the interner's own id) */
  const prefixByValue = new ByteInterner();
  /** owned locators by 12-byte keys (node id, algorithm, prefix id) -> locator id (the interner's own id) */
  const owned = new ByteInterner();
  // keys of the two tables above, written here
  const key = new Uint8Array(20);
  const keyView = new DataView(key.buffer);
  /** per context text id: 1 valid, 2 not key=value pairs, 0 not yet known */
  let ctxValid = new Uint8Array(1024);
  const flavorMaskOf: number[] = [];
  const structIds = new Map<string, number>();
  const structById = new Map<number, number>();
  let lastStructKey = -1;
  let lastStruct = -1;
  let lastLocPrefix = -1;
  let lastLocNode = -1;
  let lastLocAlg = -1;
  let lastLoc = -1;
  /** interner id -> node id; a node gets its id with its first accepted row, as the reference adds nodes */
  let nodeOfIntern = new Int32Array(256).fill(-1);
  const words = new Uint32Array(4);

  const problem = (field: string, value: string, message: string) => {
    problems.push({ row, field, message, value });
  };

  /**
   * Cell k of buf as a whole number of 1..maxDigits digits, 0..max: its value; -1 when the column
   * is absent (k < 0) or the cell empty; -2 when it is something else (the problem is noted).
   */
  const wholeNumber = (buf: Uint8Array, k: number, field: string, maxDigits: number, max: number): number => {
    if (k < 0 || ce[k] === cs[k]) return -1;
    const v = digitsIn(buf, cs[k]!, ce[k]!, maxDigits);
    if (v >= 0 && v <= max) return v;
    const text = decode(buf, cs[k]!, ce[k]!);
    problem(field, text, `${field} ${JSON.stringify(text)} is not a whole number 0..${max}`);
    return -2;
  };

  /** The header: the first record that is not a comment. */
  const onHeader = (buf: Uint8Array, cells: number, line: number) => {
    if (cells > 0 && buf[cs[0]!] === 35 /* # */ && ce[0]! > cs[0]!) return;
    const names: string[] = [];
    for (let k = 0; k < cells; k++) names.push(decode(buf, cs[k]!, ce[k]!).trim());
    header = names;
    lineOfRow.note(0, line);
    const missing = REQUIRED_COLUMNS.filter((c) => !names.includes(c));
    if (missing.length) {
      problems.push({ row: 0, field: missing.join(","), message: `the header lacks the required column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}; required: ${REQUIRED_COLUMNS.join(", ")}`, value: names.join(",") });
      fatal = true;
      return;
    }
    const colIndex: Record<string, number> = {};
    names.forEach((h, k) => {
      if (!ALL_COLUMNS.has(h)) problems.push({ row: 0, field: h, message: `unknown column ${JSON.stringify(h)}; allowed: ${[...ALL_COLUMNS].join(", ")}`, value: h });
      else if (colIndex[h] !== undefined) problems.push({ row: 0, field: h, message: `column ${JSON.stringify(h)} appears twice`, value: h });
      else colIndex[h] = k;
    });
    COLS.forEach((name, c) => (col[c] = colIndex[name] ?? -1));
    hasStructure = STRUCT_COLUMNS.some((name) => colIndex[name] !== undefined);
  };

  /**
   * A data record: cells 0..cells-1 at cs/ce in buf (the file, or the scratch buffer of a quoted
   * record; bufView is a DataView over it; plain: no cell needs trimming). The checks run in the
   * reference's order, and the first that fails makes the row's problem.
   */
  const onData = (buf: Uint8Array, bufView: DataView, cells: number, line: number, plain: boolean) => {
    row++;
    lineOfRow.note(row, line);
    const width = header!.length;
    if (cells !== width) {
      const joined: string[] = [];
      for (let k = 0; k < cells; k++) joined.push(decode(buf, cs[k]!, ce[k]!));
      problems.push({ row, field: "", message: `row has ${cells} cells but the header has ${width} columns (line ${line})`, value: joined.join(",").slice(0, 80) });
      return;
    }
    if (!plain) trimCells(buf, cs, ce, cells);
    // node
    let k = col[COL_NODE]!;
    let s = cs[k]!;
    let e = ce[k]!;
    if (s === e) return problem("node", "", "node name is empty");
    const nodeKey = nodeIds.internCell(buf, bufView, s, e);
    // sid: parseWordsBytes accepts only hex digits, ':' and '.', where trimming changes nothing,
    // so a success is parseAddr's success; anything else goes to parseAddr itself for its reason
    k = col[COL_SID]!;
    s = cs[k]!;
    e = ce[k]!;
    if (!parseWordsBytes(buf, s, e, words, 0)) {
      const text = decode(buf, s, e);
      const a = parseAddr(text);
      if (!a.ok) return problem("sid", text, a.reason);
      const w = toWords(a.value);
      for (let q = 0; q < 4; q++) words[q] = w[q]!;
    }
    const sw0 = words[0]!;
    const sw1 = words[1]!;
    const sw2 = words[2]!;
    const sw3 = words[3]!;
    // behavior
    k = col[COL_BEHAVIOR]!;
    s = cs[k]!;
    e = ce[k]!;
    if (s === e) return problem("behavior", "", "behavior is empty; write the IANA name, e.g. End.DT4");
    const bid = behaviorIds.internCell(buf, bufView, s, e);
    if (bid === t.behaviors.length) t.behaviors.push(behaviorIds.text(bid));
    // algorithm
    const alg = wholeNumber(buf, col[COL_ALG]!, "algorithm", 3, 255);
    if (alg === -2) return;
    const algorithm = alg < 0 ? 0 : alg;
    // locator
    let prefix = -1;
    k = col[COL_LOC]!;
    if (k >= 0 && ce[k]! > cs[k]!) {
      s = cs[k]!;
      e = ce[k]!;
      const tid = prefixTexts.internCell(buf, bufView, s, e);
      if (tid === prefixOfText.length) {
        // a new text: its bytes are the prefix, else parsePrefixParts says what it is or why not
        let len = parsePrefixBytes(buf, s, e, words, 0);
        let reason = "";
        if (len < 0) {
          const r = parsePrefixParts(prefixTexts.text(tid));
          if (r.ok) {
            const w = toWords(r.value.addr);
            for (let q = 0; q < 4; q++) words[q] = w[q]!;
            len = r.value.len;
          } else reason = r.reason;
        }
        if (len >= 0) {
          for (let q = 0; q < 4; q++) keyView.setUint32(4 * q, words[q]!);
          key[16] = len;
          const pid = prefixByValue.intern(key, keyView, 0, 17);
          if (pid === t.prefixes.length) t.addPrefixWords(words[0]!, words[1]!, words[2]!, words[3]!, len);
          prefixOfText.push(pid);
        } else {
          prefixReasons.push(reason);
          prefixOfText.push(-prefixReasons.length);
        }
      }
      prefix = prefixOfText[tid]!;
      if (prefix < 0) return problem("locator", prefixTexts.text(tid), prefixReasons[-prefix - 1]!);
    }
    // codepoint
    const cp = wholeNumber(buf, col[COL_CP]!, "codepoint", 5, 65535);
    if (cp === -2) return;
    const codepoint = cp < 0 ? NaN : cp;
    // function
    let fn = 0;
    let fnBig: bigint | undefined;
    k = col[COL_FN]!;
    if (k >= 0 && ce[k]! > cs[k]!) {
      s = cs[k]!;
      e = ce[k]!;
      fn = functionIn(buf, s, e);
      if (fn === -1) {
        const text = decode(buf, s, e);
        return problem("function", text, `function ${JSON.stringify(text)} is not a number (write hex as 0x100)`);
      }
      if (fn === -2) fnBig = BigInt(decode(buf, s, e));
    }
    // structure: all four or none
    let structure = -1;
    if (hasStructure) {
      let any = false;
      for (let q = 0; q < 4 && !any; q++) {
        k = col[COL_B + q]!;
        any = k >= 0 && ce[k]! > cs[k]!;
      }
      if (any) {
        let sk = 0;
        for (let q = 0; q < 4; q++) {
          k = col[COL_B + q]!;
          const v = k >= 0 ? digitsIn(buf, cs[k]!, ce[k]!, 3) : -1;
          if (v < 0 || v > 128) {
            const name = STRUCT_COLUMNS[q]!;
            const text = k >= 0 ? decode(buf, cs[k]!, ce[k]!) : "";
            return problem(name, text, `${name} ${JSON.stringify(text)} is not a whole number 0..128`);
          }
          sk = sk * 256 + v;
        }
        if (sk !== lastStructKey) {
          let sid = structById.get(sk);
          if (sid === undefined) {
            const st = { block: (sk >>> 24) & 255, node: (sk >>> 16) & 255, function: (sk >>> 8) & 255, argument: sk & 255 };
            sid = t.internStructure(st, structIds);
            structById.set(sk, sid);
          }
          lastStructKey = sk;
          lastStruct = sid;
        }
        structure = lastStruct;
      }
    }
    // context (checked on bytes: ';' and '=' are ASCII, so this is parseContext's own test); an
    // absent column reads as ""; contexts seldom repeat the row before, so no last-value check
    k = col[COL_CTX]!;
    s = k >= 0 ? cs[k]! : 0;
    e = k >= 0 ? ce[k]! : 0;
    const cid = ctxIds.intern(buf, bufView, s, e);
    if (cid >= ctxValid.length) ctxValid = growU8(ctxValid);
    if (ctxValid[cid] === 0) ctxValid[cid] = contextBytesValid(buf, s, e) ? 1 : 2;
    if (ctxValid[cid] === 2) return problem("context", ctxIds.text(cid), "context must be key=value pairs joined with ';'");
    // flavors
    k = col[COL_FLAV]!;
    s = k >= 0 ? cs[k]! : 0;
    e = k >= 0 ? ce[k]! : 0;
    const fid = flavorIds.internCell(buf, bufView, s, e);
    if (fid === t.flavorSets.length) {
      const list = flavorIds
        .text(fid)
        .split("+")
        .map((f) => f.trim())
        .filter((f) => f !== "");
      t.flavorSets.push(list);
      flavorMaskOf.push(maskOf(list));
    }
    // accepted: write the row
    if (nodeKey >= nodeOfIntern.length) {
      const g = new Int32Array(nodeOfIntern.length * 2).fill(-1);
      g.set(nodeOfIntern);
      nodeOfIntern = g;
    }
    let nid = nodeOfIntern[nodeKey]!;
    if (nid < 0) {
      nid = t.nodeNames.length;
      t.nodeNames.push(nodeIds.text(nodeKey));
      nodeOfIntern[nodeKey] = nid;
    }
    const i = t.count;
    t.w0[i] = sw0;
    t.w1[i] = sw1;
    t.w2[i] = sw2;
    t.w3[i] = sw3;
    t.node[i] = nid;
    t.behavior[i] = bid;
    t.algorithm[i] = algorithm;
    t.codepoint[i] = codepoint;
    if (fnBig !== undefined) {
      if (fnBig < 2n ** 53n) t.fn[i] = Number(fnBig);
      else {
        t.fn[i] = NaN;
        t.bigFunctions.set(i, fnBig);
      }
    } else t.fn[i] = fn;
    t.structure[i] = structure;
    t.context[i] = cid;
    t.flavorSet[i] = fid;
    t.flavorMask[i] = flavorMaskOf[fid]!;
    t.row[i] = row;
    let loc = -1;
    if (prefix >= 0) {
      // most rows name the locator of the row before
      if (prefix === lastLocPrefix && nid === lastLocNode && algorithm === lastLocAlg) loc = lastLoc;
      else {
        keyView.setInt32(0, nid);
        keyView.setInt32(4, algorithm);
        keyView.setInt32(8, prefix);
        loc = owned.intern(key, keyView, 0, 12);
        if (loc === t.locatorCount) t.addLocator(nid, algorithm, prefix);
        lastLocPrefix = prefix;
        lastLocNode = nid;
        lastLocAlg = algorithm;
        lastLoc = loc;
      }
    }
    t.locator[i] = loc;
    t.count++;
  };

  const onRecord = (buf: Uint8Array, bufView: DataView, cells: number, line: number, plain = false) => {
    if (fatal) return;
    if (header) onData(buf, bufView, cells, line, plain);
    else onHeader(buf, cells, line);
  };

  const onError = (line: number, message: string) => {
    // a broken record still counts as a row, so later rows keep their numbers (as readCsvTable)
    if (header) {
      row++;
      lineOfRow.note(row, line);
    }
    problems.push({ row: header ? row : 0, field: "", message: `${message} (line ${line})`, value: "" });
  };

  /** Set by readQuoted: the line after the record it read. */
  let lineAfterQuoted = 0;
  /**
   * The record at `start` (on line `recordLine`) that has a quote, as splitCsv's slow path reads
   * it, into the scratch buffer; returns where the next record starts, or -1 when the file ends
   * inside quotes (after noting the problem). Not in the loop below: closures there would make
   * every line of the file allocate their scope.
   */
  const readQuoted = (start: number, recordLine: number): number => {
    let line = recordLine;
    let i = start;
    let cells = 0;
    let cellStart = 0;
    scratchUsed = 0;
    const endCell = () => {
      if (cells >= cs.length) {
        cs = growI32(cs);
        ce = growI32(ce);
      }
      cs[cells] = cellStart;
      ce[cells++] = scratchUsed;
      cellStart = scratchUsed;
    };
    const put = (c: number) => {
      if (scratchUsed >= scratch.length) {
        const g = new Uint8Array(scratch.length * 2);
        g.set(scratch);
        scratch = g;
        scratchView = new DataView(g.buffer);
      }
      scratch[scratchUsed++] = c;
    };
    let inQuotes = false;
    for (; i < n; i++) {
      const c = bytes[i]!;
      if (inQuotes) {
        if (c === 34) {
          if (bytes[i + 1] === 34) {
            put(34);
            i++;
          } else inQuotes = false;
        } else {
          if (c === 10) line++;
          put(c);
        }
      } else if (c === 34) {
        if (scratchUsed > cellStart) {
          onError(recordLine, `a quote inside an unquoted field (column ${cells + 1}); quote the whole field and double inner quotes`);
          while (i < n && bytes[i] !== 10) i++;
          lineAfterQuoted = line + 1;
          return i + 1;
        }
        inQuotes = true;
      } else if (c === 44) endCell();
      else if (c === 10 || c === 13) {
        if (c === 13 && bytes[i + 1] === 10) i++;
        lineAfterQuoted = line + 1;
        endCell();
        onRecord(scratch, scratchView, cells, recordLine);
        return i + 1;
      } else put(c);
    }
    lineAfterQuoted = line;
    if (inQuotes) {
      onError(recordLine, "a quoted field is not closed before the end of the file");
      return -1;
    }
    endCell();
    onRecord(scratch, scratchView, cells, recordLine);
    return n;
  };

  // The record splitter: the same two paths as splitCsv in table-read.ts, on bytes. Line ends
  // and quotes are found with indexOf (memchr), so the loop over a line's bytes looks for commas only.
  let nextQuote = -1;
  let i = i0;
  let line = 1;
  while (i < n) {
    const start = i;
    const recordLine = line;
    let eol = bytes.indexOf(10, start);
    if (eol < 0) eol = n;
    if (nextQuote < start) {
      nextQuote = bytes.indexOf(34, start);
      if (nextQuote < 0) nextQuote = n;
    }
    if (nextQuote >= eol) {
      // no quote on the line: commas make cells, and the last cell ends at the line end (a CR
      // before the LF is not part of it)
      let lineEnd = eol;
      if (lineEnd > start && bytes[lineEnd - 1] === 13) lineEnd--;
      i = eol + 1;
      line++;
      if (lineEnd === start) continue;
      let cells = splitCommas(bytes, view, start, lineEnd, cs, ce);
      while (cells < 0) {
        cs = growI32(cs);
        ce = growI32(ce);
        cells = splitCommas(bytes, view, start, lineEnd, cs, ce);
      }
      onRecord(bytes, view, cells, recordLine, splitPlain);
      continue;
    }
    // slow path: quoted fields, cells are built in the scratch buffer
    i = readQuoted(start, recordLine);
    line = lineAfterQuoted;
    if (i < 0) break;
  }
  if (!header && !fatal) {
    problems.push({ row: 0, field: "", message: `the table has no header line; the first line must name the columns (required: ${REQUIRED_COLUMNS.join(", ")})`, value: "" });
    fatal = true;
  }
  for (const it of [nodeIds, behaviorIds, flavorIds, ctxIds, prefixTexts, prefixByValue, owned]) it.seal();
  t.setContextSource(ctxIds);
  const rows = row;
  return {
    table: t,
    problems,
    unreadable: fatal,
    lineOf: (r) => (Number.isInteger(r) && r >= 0 && r <= rows ? lineOfRow.lineOf(r) : undefined),
  };
}
