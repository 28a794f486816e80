/**
 * The packed SID table: the same content as a `SidTable`, held column by column in typed arrays
 * (four 32-bit address words, node ids, locator ids, behaviour ids, flavour sets and masks,
 * codepoints, algorithms, structures, rows, interned contexts) so that a million SIDs cost a few
 * tens of bytes each and can be sorted and swept without an object or a bigint per SID.
 *
 * `readCsvPacked` reads our CSV form straight from the file's bytes and gives exactly what
 * `readCsvTable` (table-read.ts, the readable reference) gives: the same SIDs, locators, problems
 * and line numbers (tests compare the two on random tables). `packTable` packs a `SidTable` that
 * already exists (an allocation). `radixSortIndex` is the index sort the linter's views use.
 */
import { parseWordsBytes } from "../net/fast.js";
import { Prefix } from "../net/prefix.js";
import { formatWords, parseAddr, parsePrefixParts } from "../net/text.js";
import { fromWords, toWords } from "../net/uint128.js";
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
  /** Materialised entries (shared by every view of the table), and the source objects when packed from a SidTable. */
  private readonly entries: (SidEntry | undefined)[];
  private readonly locEntries: (LocatorEntry | undefined)[] = [];
  private rankCache: Int32Array | undefined;
  /** Parts of SidEntry.key, per context id and per flavour-set id (see keyOf). */
  private readonly keyCtx: (string | undefined)[] = [];
  private readonly keyFlv: (string | undefined)[] = [];
  private tableCache: SidTable | undefined;

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
    this.entries = new Array(capacity);
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
    let e = this.entries[i];
    if (e === undefined) {
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
      const key = this.keyOf(i, behavior, algorithm);
      e =
        row > 0
          ? { sid, behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key, row }
          : { sid, behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key };
      this.entries[i] = e;
    }
    return e;
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
    const rank = this.nodeRank;
    const order = this.nodeNames.map((_, i) => i).sort((a, b) => rank[a]! - rank[b]! || a - b);
    const nodes: NodeTable[] = order.map((i) => ({ node: this.nodeNames[i]!, locators: locs[i]!, sids: sids[i]! }));
    this.tableCache = { plan: this.plan, nodes };
    return this.tableCache;
  }

  // ---- building (used by the reader and packTable)

  /** @internal */
  setEntry(i: number, e: SidEntry): void {
    this.entries[i] = e;
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
    const id = this.prefixes.length;
    if (id >= this.plen.length) {
      const grow = <T extends Uint32Array | Uint8Array>(a: T): T => {
        const b = new (a.constructor as new (n: number) => T)(a.length * 2);
        b.set(a);
        return b;
      };
      this.pw0 = grow(this.pw0);
      this.pw1 = grow(this.pw1);
      this.pw2 = grow(this.pw2);
      this.pw3 = grow(this.pw3);
      this.plen = grow(this.plen);
    }
    const [a, b, c, d] = toWords(p.addr);
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
 * Pack an existing table (e.g. an allocation). Entries and locators keep their identity:
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
 * Interns byte strings; keeps its own copy of each distinct key and decodes it on demand. The
 * open-addressing table holds [hash, id + 1] pairs side by side, so a probe reads one place.
 */
class ByteInterner {
  private slots = new Int32Array(2048); // pairs: hash, id + 1 (0 = empty)
  private starts = new Int32Array(256);
  private lens = new Int32Array(256);
  private store = new Uint8Array(4096);
  private used = 0;
  size = 0;
  private readonly texts: (string | undefined)[] = [];

  /** Id of buf[s..e), adding it when new. */
  intern(buf: Uint8Array, s: number, e: number): number {
    let h = 0x811c9dc5;
    for (let k = s; k < e; k++) h = Math.imul(h ^ buf[k]!, 16777619);
    // FNV-1a mixes upwards only; a final mix (MurmurHash3's) spreads every byte into the low bits used for slots
    h ^= h >>> 16;
    h = Math.imul(h, 0x85ebca6b);
    h ^= h >>> 13;
    h = Math.imul(h, 0xc2b2ae35);
    h ^= h >>> 16;
    const len = e - s;
    const slots = this.slots;
    const mask = (slots.length >> 1) - 1;
    let slot = h & mask;
    for (;;) {
      const v = slots[2 * slot + 1]!;
      if (v === 0) break;
      if (slots[2 * slot] === h) {
        const id = v - 1;
        if (this.lens[id] === len) {
          const st = this.starts[id]!;
          const store = this.store;
          let k = 0;
          while (k < len && store[st + k] === buf[s + k]) k++;
          if (k === len) return id;
        }
      }
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
    }
    this.store.set(buf.subarray(s, e), this.used);
    this.starts[id] = this.used;
    this.lens[id] = len;
    this.used += len;
    slots[2 * slot] = h;
    slots[2 * slot + 1] = id + 1;
    if (this.size * 2 > mask + 1) this.rehash();
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

  private rehash(): void {
    const old = this.slots;
    const slots = new Int32Array(old.length * 2);
    const mask = (slots.length >> 1) - 1;
    for (let o = 0; o < old.length; o += 2) {
      const v = old[o + 1]!;
      if (v === 0) continue;
      const h = old[o]!;
      let slot = h & mask;
      while (slots[2 * slot + 1] !== 0) slot = (slot + 1) & mask;
      slots[2 * slot] = h;
      slots[2 * slot + 1] = v;
    }
    this.slots = slots;
  }
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

const encoder = new TextEncoder();

/**
 * parseContext's test on bytes: empty, or every ';'-separated part has an '=' after at least one
 * character. (The value is already trimmed, so "only spaces" cannot occur.)
 */
function contextBytesValid(buf: Uint8Array, s: number, e: number): boolean {
  if (s === e) return true;
  let ps = s;
  let eq = -1;
  for (let k = s; k <= e; k++) {
    const c = k === e ? 59 : buf[k]!;
    if (c === 59 /* ; */) {
      if (eq < 0 || eq === ps) return false;
      ps = k + 1;
      eq = -1;
    } else if (c === 61 /* = */ && eq < 0) eq = k;
  }
  return true;
}
const ALL_COLUMNS = new Set<string>([...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS]);
const STRUCT_COLUMNS = ["block_bits", "node_bits", "function_bits", "argument_bits"] as const;

/** ASCII whitespace that String.prototype.trim removes (the non-ASCII kinds take the slow path). */
const isAsciiSpace = (c: number) => c === 32 || (c >= 9 && c <= 13);

/**
 * Read a CSV SID table from its bytes (UTF-8; a leading byte-order mark is skipped). Gives the
 * same table, problems and line numbers as `readCsvTable` on the decoded text; the caller checks
 * that the bytes are UTF-8 (the CLI does, with `decodeUtf8` for the message).
 */
export function readCsvPacked(bytes: Uint8Array, plan = ""): PackedReadResult {
  const n = bytes.length;
  let i0 = 0;
  if (n >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) i0 = 3;
  // capacity: one SID per line at most
  let lineCount = 1;
  for (let p = bytes.indexOf(10, i0); p >= 0; p = bytes.indexOf(10, p + 1)) lineCount++;
  const t = new PackedSidTable(plan, 0, lineCount);
  const problems: TableProblem[] = [];
  let lineOfRow = new Int32Array(lineCount + 2);

  // cell ranges of the record at hand, into `cur` (the file, or the scratch buffer of a quoted record)
  let cs = new Int32Array(32);
  let ce = new Int32Array(32);
  let cells = 0;
  let cur: Uint8Array = bytes;
  let scratch = new Uint8Array(1024);
  let scratchUsed = 0;
  // a second scratch for cells that needed Unicode trimming
  let alt = new Uint8Array(256);
  let altUsed = 0;
  let valBuf: Uint8Array = bytes;
  let vs = 0;
  let ve = 0;

  let header: string[] | undefined;
  const col = new Int32Array(16).fill(-1);
  const colIndex: Record<string, number> = {};
  let row = 0;
  let fatal = false;

  const nodeIds = new ByteInterner();
  const behaviorIds = new ByteInterner();
  const flavorIds = new ByteInterner();
  const ctxIds = new ByteInterner();
  const prefixTexts = new ByteInterner();
  /** per prefix text id: prefix id (>= 0), or the index of its reason in prefixReasons as -(k + 1) */
  const prefixOfText: number[] = [];
  const prefixReasons: string[] = [];
  const prefixByValue = new Map<string, number>();
  /** per context text id: 1 valid, 0 not key=value pairs */
  const ctxValid: number[] = [];
  const flavorMaskOf: number[] = [];
  const structIds = new Map<string, number>();
  const structById = new Map<number, number>();
  /** owned locators: key node * 256 + algorithm -> list of [prefix id, locator id] */
  const owned = new Map<number, number[]>();
  /** interner id -> node id; a node gets its id with its first accepted row, as the reference adds nodes */
  let nodeOfIntern = new Int32Array(256).fill(-1);
  const words = new Uint32Array(4);

  const COL_NODE = 0,
    COL_SID = 1,
    COL_BEHAVIOR = 2,
    COL_ALG = 3,
    COL_LOC = 4,
    COL_FLAV = 5,
    COL_CP = 6,
    COL_FN = 7,
    COL_B = 8,
    COL_N = 9,
    COL_F = 10,
    COL_A = 11,
    COL_CTX = 12;
  const COLS = ["node", "sid", "behavior", "algorithm", "locator", "flavors", "codepoint", "function", "block_bits", "node_bits", "function_bits", "argument_bits", "context"];

  const cellText = (k: number) => decode(cur, cs[k]!, ce[k]!);
  const valText = () => decode(valBuf, vs, ve);

  /**
   * Select column `c` (one of COL_*) as the value vs..ve in valBuf, trimmed and with our formula
   * guard removed, as `unneutralize(cell.trim())` in the reference. False when the column is absent.
   */
  const get = (c: number): boolean => {
    const k = col[c]!;
    if (k < 0) return false;
    let s = cs[k]!;
    let e = ce[k]!;
    while (s < e && isAsciiSpace(cur[s]!)) s++;
    while (e > s && isAsciiSpace(cur[e - 1]!)) e--;
    if (s < e && (cur[s]! >= 0x80 || cur[e - 1]! >= 0x80)) {
      // Unicode spaces at an edge: use the string functions themselves
      let str = decode(cur, s, e).trim();
      if (str.length > 1 && str.charCodeAt(0) === 39 && /^'[=+\-@\t\r]/.test(str)) str = str.slice(1);
      const need = str.length * 3;
      if (altUsed + need > alt.length) {
        alt = new Uint8Array(Math.max(alt.length * 2, need + 256));
        altUsed = 0;
      }
      const w = encoder.encodeInto(str, alt.subarray(altUsed));
      valBuf = alt;
      vs = altUsed;
      ve = altUsed + w.written!;
      altUsed = ve;
      return true;
    }
    if (e - s > 1 && cur[s] === 39) {
      const c1 = cur[s + 1]!;
      if (c1 === 61 || c1 === 43 || c1 === 45 || c1 === 64 || c1 === 9 || c1 === 13) s++;
    }
    valBuf = cur;
    vs = s;
    ve = e;
    return true;
  };

  const bad = (field: string, value: string, message: string) => {
    problems.push({ row, field, message, value });
  };

  /** Digits only, 1..maxDigits of them: the value, else -1. */
  const digits = (maxDigits: number): number => {
    const len = ve - vs;
    if (len < 1 || len > maxDigits) return -1;
    let v = 0;
    for (let k = vs; k < ve; k++) {
      const c = valBuf[k]!;
      if (c < 48 || c > 57) return -1;
      v = v * 10 + (c - 48);
    }
    return v;
  };

  // The last value of a column when it came from the file itself: most rows repeat the node,
  // behaviour, locator and flavours of the row before, and comparing bytes is cheaper than hashing.
  const lastS = new Int32Array(16).fill(-1);
  const lastE = new Int32Array(16).fill(-1);
  const lastId = new Int32Array(16).fill(-1);
  /** Interned id of the current value of column c (interner `into`), using the last-value cache. */
  const internCol = (c: number, into: ByteInterner): number => {
    if (valBuf === bytes) {
      const ps = lastS[c]!;
      const len = ve - vs;
      if (ps >= 0 && lastE[c]! - ps === len) {
        let k = 0;
        while (k < len && bytes[ps + k] === bytes[vs + k]) k++;
        if (k === len) return lastId[c]!;
      }
      const id = into.intern(bytes, vs, ve);
      lastS[c] = vs;
      lastE[c] = ve;
      lastId[c] = id;
      return id;
    }
    return into.intern(valBuf, vs, ve);
  };

  const onRecord = (line: number) => {
    if (fatal) return;
    if (!header) {
      if (cells > 0 && cur[cs[0]!] === 35 /* # */ && ce[0]! > cs[0]!) return;
      header = [];
      for (let k = 0; k < cells; k++) header.push(cellText(k).trim());
      lineOfRow[0] = line;
      const missing = REQUIRED_COLUMNS.filter((c) => !header!.includes(c));
      if (missing.length) {
        problems.push({ row: 0, field: missing.join(","), message: `the header lacks the required column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}; required: ${REQUIRED_COLUMNS.join(", ")}`, value: header.join(",") });
        fatal = true;
        return;
      }
      header.forEach((h, k) => {
        if (!ALL_COLUMNS.has(h)) problems.push({ row: 0, field: h, message: `unknown column ${JSON.stringify(h)}; allowed: ${[...ALL_COLUMNS].join(", ")}`, value: h });
        else if (colIndex[h] !== undefined) problems.push({ row: 0, field: h, message: `column ${JSON.stringify(h)} appears twice`, value: h });
        else colIndex[h] = k;
      });
      COLS.forEach((name, c) => (col[c] = colIndex[name] ?? -1));
      return;
    }
    row++;
    if (row >= lineOfRow.length) lineOfRow = growI32(lineOfRow);
    lineOfRow[row] = line;
    if (cells !== header.length) {
      const joined: string[] = [];
      for (let k = 0; k < cells; k++) joined.push(cellText(k));
      problems.push({ row, field: "", message: `row has ${cells} cells but the header has ${header.length} columns (line ${line})`, value: joined.join(",").slice(0, 80) });
      return;
    }
    const i = t.count;
    // node
    get(COL_NODE);
    if (ve === vs) return bad("node", "", "node name is empty");
    const nodeKey = internCol(COL_NODE, nodeIds);
    // sid
    get(COL_SID);
    // parseWordsBytes accepts only hex digits, ':' and '.', where trimming changes nothing, so a
    // success is parseAddr's success; anything else goes to parseAddr itself for its reason.
    if (!parseWordsBytes(valBuf, vs, ve, words, 0)) {
      const text = valText();
      const a = parseAddr(text);
      if (!a.ok) return bad("sid", text, a.reason);
      const w = toWords(a.value);
      words[0] = w[0];
      words[1] = w[1];
      words[2] = w[2];
      words[3] = w[3];
    }
    const sw0 = words[0]!,
      sw1 = words[1]!,
      sw2 = words[2]!,
      sw3 = words[3]!;
    // behavior
    get(COL_BEHAVIOR);
    if (ve === vs) return bad("behavior", "", "behavior is empty; write the IANA name, e.g. End.DT4");
    const bid = internCol(COL_BEHAVIOR, behaviorIds);
    if (bid === t.behaviors.length) t.behaviors.push(behaviorIds.text(bid));
    // algorithm
    let algorithm = 0;
    if (get(COL_ALG) && ve > vs) {
      const v = digits(3);
      if (v < 0 || v > 255) {
        const text = valText();
        return bad("algorithm", text, `algorithm ${JSON.stringify(text)} is not a whole number 0..255`);
      }
      algorithm = v;
    }
    // locator
    let prefix = -1;
    if (get(COL_LOC) && ve > vs) {
      const tid = internCol(COL_LOC, prefixTexts);
      if (tid === prefixOfText.length) {
        const text = prefixTexts.text(tid);
        const r = parsePrefixParts(text);
        if (r.ok) {
          const key = `${r.value.len}|${r.value.addr}`;
          let pid = prefixByValue.get(key);
          if (pid === undefined) {
            pid = t.addPrefix(new Prefix(r.value.addr, r.value.len));
            prefixByValue.set(key, pid);
          }
          prefixOfText.push(pid);
        } else {
          prefixReasons.push(r.reason);
          prefixOfText.push(-prefixReasons.length);
        }
      }
      const pv = prefixOfText[tid]!;
      if (pv < 0) return bad("locator", prefixTexts.text(tid), prefixReasons[-pv - 1]!);
      prefix = pv;
    }
    // codepoint
    let codepoint = NaN;
    if (get(COL_CP) && ve > vs) {
      const v = digits(5);
      if (v < 0 || v > 65535) {
        const text = valText();
        return bad("codepoint", text, `codepoint ${JSON.stringify(text)} is not a whole number 0..65535`);
      }
      codepoint = v;
    }
    // function
    let fnNum = 0;
    let fnBig: bigint | undefined;
    if (get(COL_FN) && ve > vs) {
      const len = ve - vs;
      let ok = false;
      if (len >= 3 && valBuf[vs] === 48 && (valBuf[vs + 1] === 120 || valBuf[vs + 1] === 88) && len - 2 <= 32) {
        ok = true;
        let v = 0;
        for (let k = vs + 2; k < ve; k++) {
          const c = valBuf[k]!;
          const d = c >= 48 && c <= 57 ? c - 48 : c >= 97 && c <= 102 ? c - 87 : c >= 65 && c <= 70 ? c - 55 : -1;
          if (d < 0) {
            ok = false;
            break;
          }
          v = v * 16 + d;
        }
        if (ok && len - 2 > 13) fnBig = BigInt(valText());
        else fnNum = v;
      }
      if (!ok && len <= 39) {
        ok = true;
        let v = 0;
        for (let k = vs; k < ve; k++) {
          const c = valBuf[k]!;
          if (c < 48 || c > 57) {
            ok = false;
            break;
          }
          v = v * 10 + (c - 48);
        }
        if (ok && len > 15) fnBig = BigInt(valText());
        else fnNum = v;
      }
      if (!ok) {
        const text = valText();
        return bad("function", text, `function ${JSON.stringify(text)} is not a number (write hex as 0x100)`);
      }
    }
    // structure: all four or none
    let structure = -1;
    if (col[COL_B]! >= 0 || col[COL_N]! >= 0 || col[COL_F]! >= 0 || col[COL_A]! >= 0) {
      let any = false;
      for (let k = 0; k < 4 && !any; k++) if (get(COL_B + k) && ve > vs) any = true;
      if (any) {
        let key = 0;
        for (let k = 0; k < 4; k++) {
          const present = get(COL_B + k);
          const v = present ? digits(3) : -1;
          if (v < 0 || v > 128) {
            const name = STRUCT_COLUMNS[k]!;
            const text = present ? valText() : "";
            return bad(name, text, `${name} ${JSON.stringify(text)} is not a whole number 0..128`);
          }
          key = key * 256 + v;
        }
        let sid = structById.get(key);
        if (sid === undefined) {
          const st = { block: (key >>> 24) & 255, node: (key >>> 16) & 255, function: (key >>> 8) & 255, argument: key & 255 };
          sid = t.internStructure(st, structIds);
          structById.set(key, sid);
        }
        structure = sid;
      }
    }
    // context (checked on bytes: ';' and '=' are ASCII, so this is parseContext's own test)
    if (!get(COL_CTX)) vs = ve = 0; // an absent column reads as ""
    // contexts seldom repeat the row before (and differ near their end), so no last-value check
    const cid = ctxIds.intern(valBuf, vs, ve);
    if (cid === ctxValid.length) ctxValid.push(contextBytesValid(valBuf, vs, ve) ? 1 : 0);
    if (ctxValid[cid] === 0) return bad("context", ctxIds.text(cid), "context must be key=value pairs joined with ';'");
    // flavors
    if (!get(COL_FLAV)) vs = ve = 0;
    const fid = internCol(COL_FLAV, flavorIds);
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
    } else t.fn[i] = fnNum;
    t.structure[i] = structure;
    t.context[i] = cid;
    t.flavorSet[i] = fid;
    t.flavorMask[i] = flavorMaskOf[fid]!;
    t.row[i] = row;
    let loc = -1;
    if (prefix >= 0) {
      const k = nid * 256 + algorithm;
      let list = owned.get(k);
      if (!list) owned.set(k, (list = []));
      for (let q = 0; q < list.length; q += 2) if (list[q] === prefix) loc = list[q + 1]!;
      if (loc < 0) {
        loc = t.addLocator(nid, algorithm, prefix);
        list.push(prefix, loc);
      }
    }
    t.locator[i] = loc;
    t.count++;
  };

  const onError = (line: number, message: string) => {
    // a broken record still counts as a row, so later rows keep their numbers (as readCsvTable)
    if (header) {
      row++;
      if (row >= lineOfRow.length) lineOfRow = growI32(lineOfRow);
      lineOfRow[row] = line;
    }
    problems.push({ row: header ? row : 0, field: "", message: `${message} (line ${line})`, value: "" });
  };

  const pushCell = (s: number, e: number) => {
    if (cells >= cs.length) {
      cs = growI32(cs);
      ce = growI32(ce);
    }
    cs[cells] = s;
    ce[cells] = e;
    cells++;
  };
  const scratchPut = (c: number) => {
    if (scratchUsed >= scratch.length) {
      const s = new Uint8Array(scratch.length * 2);
      s.set(scratch);
      scratch = s;
    }
    scratch[scratchUsed++] = c;
  };

  // The record splitter: the same two paths as splitCsv in table-read.ts, on bytes.
  let i = i0;
  let line = 1;
  while (i < n) {
    const start = i;
    const recordLine = line;
    // one pass over the line: commas make cells; a quote sends the record to the slow path
    cells = 0;
    let s = start;
    let k = start;
    let quoted = false;
    for (; k < n; k++) {
      const c = bytes[k]!;
      if (c === 44) {
        if (cells >= cs.length) {
          cs = growI32(cs);
          ce = growI32(ce);
        }
        cs[cells] = s;
        ce[cells++] = k;
        s = k + 1;
      } else if (c === 10) break;
      else if (c === 34) {
        quoted = true;
        break;
      }
    }
    if (!quoted) {
      const eol = k;
      let lineEnd = eol;
      if (lineEnd > start && bytes[lineEnd - 1] === 13) lineEnd--;
      i = eol + 1;
      line++;
      if (lineEnd === start) continue;
      cur = bytes;
      // the last cell ends at the line end (a CR before the LF is not part of it)
      pushCell(s, lineEnd);
      onRecord(recordLine);
      continue;
    }
    // slow path: quoted fields, cells are built in the scratch buffer
    cur = scratch;
    scratchUsed = 0;
    cells = 0;
    let cellStart = 0;
    let inQuotes = false;
    let closed = false;
    i = start;
    for (; i < n; i++) {
      const c = bytes[i]!;
      if (inQuotes) {
        if (c === 34) {
          if (bytes[i + 1] === 34) {
            scratchPut(34);
            i++;
          } else inQuotes = false;
        } else {
          if (c === 10) line++;
          scratchPut(c);
        }
      } else if (c === 34) {
        if (scratchUsed > cellStart) {
          onError(recordLine, `a quote inside an unquoted field (column ${cells + 1}); quote the whole field and double inner quotes`);
          while (i < n && bytes[i] !== 10) i++;
          line++;
          i++;
          closed = true;
          break;
        }
        inQuotes = true;
      } else if (c === 44) {
        cur = scratch;
        pushCell(cellStart, scratchUsed);
        cellStart = scratchUsed;
      } else if (c === 10 || c === 13) {
        if (c === 13 && bytes[i + 1] === 10) i++;
        i++;
        line++;
        closed = true;
        pushCell(cellStart, scratchUsed);
        cur = scratch;
        onRecord(recordLine);
        break;
      } else scratchPut(c);
    }
    if (!closed) {
      if (inQuotes) {
        onError(recordLine, "a quoted field is not closed before the end of the file");
        break;
      }
      pushCell(cellStart, scratchUsed);
      cur = scratch;
      onRecord(recordLine);
    }
  }
  if (!header && !fatal) {
    problems.push({ row: 0, field: "", message: `the table has no header line; the first line must name the columns (required: ${REQUIRED_COLUMNS.join(", ")})`, value: "" });
    fatal = true;
  }
  t.setContextSource(ctxIds);
  const lines = lineOfRow;
  const rows = row;
  return {
    table: t,
    problems,
    unreadable: fatal,
    lineOf: (r) => {
      if (!Number.isInteger(r) || r < 0 || r > rows) return undefined;
      const l = lines[r]!;
      return l > 0 ? l : undefined;
    },
  };
}
