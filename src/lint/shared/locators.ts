/**
 * Locator views the space, summary and completeness rules share, made once per lint run from the
 * packed table (`ctx.shared`): the locators grouped by prefix and algorithm, where each locator
 * is, and every node's SIDs in address order. A helper asks for what it builds on before it
 * enters ctx.shared, so that no shared value is made (and timed) inside another.
 */
import type { Prefix } from "../../net/prefix.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import { type PackedSidTable, maskWord } from "../../sid/packed.js";
import type { RuleContext } from "../types.js";
import { type WordRange, compareSid, wordRangeAt } from "./prefixes.js";

/** One locator prefix and algorithm, with every node that holds it (anycast members share one). */
export interface LocatorGroup {
  /** The prefix, host bits cleared. */
  readonly prefix: Prefix;
  /** Its id in ctx.packed.table.prefixes (as written there: host bits may be set). */
  readonly prefixId: number;
  /** The prefix as words, for comparisons without bigints. */
  readonly range: WordRange;
  readonly algorithm: number;
  /** Locator ids (packed table) of the holders, one per node, sorted by node name. */
  readonly holders: readonly number[];
  /** The holders' node names, in the same order. */
  readonly nodes: readonly string[];
  /** The first anycast group a holder's locator names; "" when none does. */
  readonly anycast: string;
}

/** Words of prefix `p` of t with host bits cleared, as a key. */
function maskedKey(t: PackedSidTable, p: number): string {
  const L = t.plen[p]!;
  return `${L}|${maskWord(t.pw0[p]!, L)}|${maskWord(t.pw1[p]!, L - 32)}|${maskWord(t.pw2[p]!, L - 64)}|${maskWord(t.pw3[p]!, L - 96)}`;
}

/**
 * The table's prefixes with host bits cleared: per prefix id, the first id of the same masked
 * value (prefixes are kept as written, so ids may differ in host bits only), and whether the id
 * has host bits. Keys are only made when some prefix has host bits.
 */
export function maskedPrefixes(ctx: RuleContext): { readonly same: Int32Array; readonly hostBits: Uint8Array } {
  const t = ctx.packed.table;
  return ctx.shared("masked-prefixes", () => {
    const n = t.prefixes.length;
    const same = new Int32Array(n);
    const hostBits = new Uint8Array(n);
    let any = false;
    for (let p = 0; p < n; p++) {
      same[p] = p;
      const L = t.plen[p]!;
      const clean = maskWord(t.pw0[p]!, L) === t.pw0[p] && maskWord(t.pw1[p]!, L - 32) === t.pw1[p] && maskWord(t.pw2[p]!, L - 64) === t.pw2[p] && maskWord(t.pw3[p]!, L - 96) === t.pw3[p];
      if (!clean) hostBits[p] = 1;
      any ||= !clean;
    }
    if (any) {
      const first = new Map<string, number>();
      for (let p = 0; p < n; p++) {
        const k = maskedKey(t, p);
        const q = first.get(k);
        if (q === undefined) first.set(k, p);
        else same[p] = q;
      }
    }
    return { same, hostBits };
  });
}

/**
 * The locators grouped by prefix (host bits ignored) and algorithm, in the address order of
 * ctx.locators, each with its holders. Equal prefixes are neighbours in that order and sorted by
 * node name there, so a group is built from one run without a sort.
 */
export function locatorGroups(ctx: RuleContext): readonly LocatorGroup[] {
  const { table: t, locatorOrder } = ctx.packed;
  const { same, hostBits } = maskedPrefixes(ctx);
  return ctx.shared("locator-groups", () => {
    const out: { prefix: Prefix; prefixId: number; range: WordRange; algorithm: number; holders: number[]; nodes: string[]; anycast: string }[] = [];
    let run = -1; // masked prefix of the current run
    let runStart = 0; // index in `out` of the first group of the current run
    for (const id of locatorOrder) {
      const p = same[t.locPrefix[id]!]!;
      if (p !== run) {
        run = p;
        runStart = out.length;
      }
      const alg = t.locAlgorithm[id]!;
      let g: (typeof out)[number] | undefined;
      for (let j = runStart; j < out.length && !g; j++) if (out[j]!.algorithm === alg) g = out[j];
      if (!g) {
        g = { prefix: hostBits[p] ? t.prefixes[p]!.masked() : t.prefixes[p]!, prefixId: p, range: wordRangeAt(t, p), algorithm: alg, holders: [], nodes: [], anycast: "" };
        out.push(g);
      }
      const name = t.nodeNames[t.locNode[id]!]!;
      if (g.nodes[g.nodes.length - 1] === name) continue; // a node's second locator of this prefix
      g.holders.push(id);
      g.nodes.push(name);
      if (g.anycast === "") g.anycast = t.locatorEntry(id).anycast;
    }
    return out;
  });
}

/**
 * Where a locator is: for a table, the first row (lowest row number) of a SID declared under it
 * (the same node and prefix, host bits ignored); for a plan, or a locator with no SID row, the
 * node. Built once in one pass over the SIDs.
 */
export function locatorLocator(ctx: RuleContext): (locatorId: number) => SourceLocation {
  const t = ctx.packed.table;
  const { same } = maskedPrefixes(ctx);
  return ctx.shared("locator-locator", () => {
    const rank = t.nodeRank;
    // one key per node (by name) and masked prefix: what a SID's locator column says
    const keyOf = new Int32Array(t.locatorCount);
    const keys = new Map<number, number>();
    for (let id = 0; id < t.locatorCount; id++) {
      const k = rank[t.locNode[id]!]! * t.prefixes.length + same[t.locPrefix[id]!]!;
      let v = keys.get(k);
      if (v === undefined) keys.set(k, (v = keys.size));
      keyOf[id] = v;
    }
    const first = new Int32Array(keys.size).fill(-1);
    for (let i = 0; i < t.count; i++) {
      const l = t.locator[i]!;
      const row = t.row[i]!;
      if (l < 0 || row <= 0) continue;
      const k = keyOf[l]!;
      const f = first[k]!;
      // equal rows give equal locations, so which of them wins does not matter
      if (f < 0 || t.row[f]! > row) first[k] = i;
    }
    return (id: number) => {
      const f = first[keyOf[id]!]!;
      return f >= 0 ? ctx.locateSidAt(f) : ctx.locateNode(t.nodeNames[t.locNode[id]!]!);
    };
  });
}

/** Every node's SIDs in the order of ctx.sids (address order), for range questions. */
export interface SidsByNode {
  /** SID indices, node after node (by name rank); a node's SIDs are sids[start[r] .. start[r + 1]). */
  readonly sids: Int32Array;
  readonly start: Int32Array;
  /** Rank of a node name (see PackedSidTable.nodeRank), or -1 for a name the table does not hold. */
  rankOf(name: string): number;
}

export function sidsByNode(ctx: RuleContext): SidsByNode {
  const { table: t, sidOrder } = ctx.packed;
  return ctx.shared("sids-by-node", () => {
    const rank = t.nodeRank;
    const ranks = new Map<string, number>();
    let nr = 0;
    t.nodeNames.forEach((n, id) => {
      ranks.set(n, rank[id]!);
      nr = Math.max(nr, rank[id]! + 1);
    });
    // a counting sort of sidOrder by node rank (stable: address order within a node)
    const start = new Int32Array(nr + 1);
    for (let i = 0; i < t.count; i++) start[rank[t.node[i]!]! + 1]!++;
    for (let r = 0; r < nr; r++) start[r + 1]! += start[r]!;
    const fill = start.slice(0, nr);
    const sids = new Int32Array(t.count);
    for (let k = 0; k < sidOrder.length; k++) {
      const i = sidOrder[k]!;
      sids[fill[rank[t.node[i]!]!]!++] = i;
    }
    return { sids, start, rankOf: (name: string) => ranks.get(name) ?? -1 };
  });
}

/** The SIDs of node `name` that lie in r, in address order. */
export function sidsOfNodeIn(t: PackedSidTable, by: SidsByNode, name: string, r: WordRange): number[] {
  const rk = by.rankOf(name);
  if (rk < 0) return [];
  const s = by.sids;
  let lo = by.start[rk]!;
  let hi = by.start[rk + 1]!;
  const end = hi;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (compareSid(t, s[mid]!, r.f0, r.f1, r.f2, r.f3) < 0) lo = mid + 1;
    else hi = mid;
  }
  const out: number[] = [];
  for (let k = lo; k < end && compareSid(t, s[k]!, r.l0, r.l1, r.l2, r.l3) <= 0; k++) out.push(s[k]!);
  return out;
}
