/**
 * What the space rules (reserved-space, documentation-space, edge-filtering,
 * infrastructure-collision) judge, found once per lint run: the blocks, the locators outside
 * them, and the SIDs outside both; and the registry rows each falls in.
 */
import { Prefix } from "../../net/prefix.js";
import { SPECIAL_RANGES, type SpaceCategory, type SpaceRange, rangesOverlapping } from "../../net/special.js";
import { fromWords } from "../../net/uint128.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import { type PackedSidTable, maskWord } from "../../sid/packed.js";
import type { RuleContext } from "../types.js";
import { locatorGroups, locatorLocator } from "./locators.js";
import { PrefixIndex, type WordRange, isSubnetRange, maskRange, maskSidInto, sidInRange, wordRange } from "./prefixes.js";
import { compareSids } from "./sids.js";

/** Something the space rules judge: a block, a locator outside every block, or one stray SID (/128). */
export interface SpaceSubject {
  readonly kind: "block" | "locator" | "sid";
  readonly prefix: Prefix;
  /** The prefix as words. */
  readonly range: WordRange;
  /** The prefix as text; for a stray SID its address. */
  readonly text: string;
  /** For people: "block metro", "locator 5f00::/64 of r1", "SID 5f00::1 of r1". */
  readonly label: string;
  readonly objects: readonly string[];
  readonly location: SourceLocation;
  /** For kind "sid": the SID (index into ctx.packed.table) and its node. */
  readonly sid?: number;
  readonly node?: string;
}

/** The subjects: blocks and locators (outermost first), and the stray SIDs, kept as indices until reported. */
export interface SpaceSubjects {
  readonly prefixes: readonly SpaceSubject[];
  /** SIDs outside every block and locator subject (indices into ctx.packed.table), in the order of ctx.sids. */
  readonly strays: Int32Array;
}

/** The subject of stray SID i (made only for the SIDs a rule reports). */
export function straySubject(ctx: RuleContext, i: number): SpaceSubject {
  const t = ctx.packed.table;
  const a = t.formatSid(i);
  const node = t.nodeOf(i);
  return { kind: "sid", prefix: new Prefix(t.sidAt(i), 128), range: maskRange(t.w0[i]!, t.w1[i]!, t.w2[i]!, t.w3[i]!, 128), text: a, label: `SID ${a} of ${node}`, objects: [node, a], location: ctx.locateSidAt(i), sid: i, node };
}

/**
 * The subjects of the space rules, outermost first, so one cause gives one finding: the declared
 * blocks of the plan (or, when `inferBlocks` is set and there is no plan, the blocks a bare table
 * implies: each SID's prefix of its advertised block length, else its locator); then every locator
 * outside those blocks; then every SID outside all of them. Deterministic order.
 */
export function spaceSubjects(ctx: RuleContext, inferBlocks: boolean): SpaceSubjects {
  const plan = ctx.input.plan;
  const { table: t, sidOrder } = ctx.packed;
  const groups = locatorGroups(ctx);
  const where = locatorLocator(ctx);
  // with a plan the blocks are the plan's either way, so both callers share one scan
  return ctx.shared(`space-subjects|${!plan && inferBlocks}`, () => {
    const prefixes: SpaceSubject[] = [];
    if (plan) {
      for (const b of plan.blocks) {
        const text = b.prefix.format();
        // located only when reported: finding a position in a plan file may mean parsing it again
        const at = ["blocks", b.index, "prefix"];
        prefixes.push({ kind: "block", prefix: b.prefix, range: wordRange(b.prefix), text, label: `block ${b.name} (${text})`, objects: [b.name, text], get location() { return ctx.locatePlan(at); } });
      }
    } else if (inferBlocks) {
      for (const { prefix, range, sid } of inferredBlocks(t)) {
        const k = prefix.format();
        prefixes.push({ kind: "block", prefix, range, text: k, label: `block ${k} (from the SID structure of the table)`, objects: [k], location: ctx.locateSidAt(sid) });
      }
    }
    const blocks = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p, range: p.range })));
    const locs: SpaceSubject[] = [];
    for (const g of groups) {
      if (blocks.containingRange(g.range)) continue;
      const text = g.prefix.format();
      locs.push({ kind: "locator", prefix: g.prefix, range: g.range, text, label: `locator ${text} of ${g.nodes.join(", ")}`, objects: [...g.nodes, text], location: where(g.holders[0]!) });
    }
    prefixes.push(...locs);
    const covered = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p, range: p.range })));
    // found in source order (neighbours share a prefix, which the index remembers), listed in the order of ctx.sids
    const stray = new Uint8Array(t.count);
    let n = 0;
    for (let i = 0; i < t.count; i++) if (!covered.containingSid(t, i)) (stray[i] = 1), n++;
    const strays = new Int32Array(n);
    if (n > 0) for (let k = 0, m = 0; m < n; k++) if (stray[sidOrder[k]!]) strays[m++] = sidOrder[k]!;
    return { prefixes, strays };
  });
}

/**
 * The blocks a bare table implies, sorted by their text: each SID's prefix of its structure's
 * block length (1..128), else its locator, host bits cleared; each with the SID of the lowest row
 * that implies it (the first in the order of ctx.sids among equal rows).
 */
function inferredBlocks(t: PackedSidTable): { prefix: Prefix; range: WordRange; sid: number }[] {
  const seen = new Map<string, { words: Uint32Array; len: number; sid: number }>();
  const m = new Uint32Array(4);
  let last: { words: Uint32Array; len: number; sid: number } | undefined;
  for (let i = 0; i < t.count; i++) {
    const st = t.structure[i]!;
    const b = st >= 0 ? t.structures[st]!.block : 0;
    let len: number;
    if (b >= 1 && b <= 128) {
      len = b;
      maskSidInto(t, i, len, m);
    } else {
      const l = t.locator[i]!;
      if (l < 0) continue;
      const p = t.locPrefix[l]!;
      len = t.plen[p]!;
      m[0] = maskWord(t.pw0[p]!, len);
      m[1] = maskWord(t.pw1[p]!, len - 32);
      m[2] = maskWord(t.pw2[p]!, len - 64);
      m[3] = maskWord(t.pw3[p]!, len - 96);
    }
    // neighbouring SIDs mostly imply the same block: compare with the last one before hashing
    let e = last && last.len === len && last.words[0] === m[0] && last.words[1] === m[1] && last.words[2] === m[2] && last.words[3] === m[3] ? last : undefined;
    if (!e) {
      const key = `${len}|${m[0]}|${m[1]}|${m[2]}|${m[3]}`;
      e = seen.get(key);
      if (!e) seen.set(key, (e = { words: m.slice(), len, sid: i }));
      last = e;
    }
    const d = t.row[e.sid]! - t.row[i]!;
    if (d > 0 || (d === 0 && compareSids(t, i, e.sid) < 0)) e.sid = i;
  }
  const out = [...seen.values()].map((e) => {
    const prefix = new Prefix(fromWords(e.words[0]!, e.words[1]!, e.words[2]!, e.words[3]!), e.len);
    return { prefix, range: maskRange(e.words[0]!, e.words[1]!, e.words[2]!, e.words[3]!, e.len), sid: e.sid, text: prefix.format() };
  });
  return out.sort((a, b) => (a.text < b.text ? -1 : a.text > b.text ? 1 : 0));
}

/** Registry rows by the top byte of the addresses they hold, most specific first. */
const ROWS_BY_TOP_BYTE: readonly (readonly { row: SpaceRange; index: number; range: WordRange }[])[] = (() => {
  const rows = SPECIAL_RANGES.map((row, index) => ({ row, index, range: wordRange(row.prefix) })).sort((a, b) => b.row.prefix.len - a.row.prefix.len);
  const out: { row: SpaceRange; index: number; range: WordRange }[][] = [];
  for (let top = 0; top < 256; top++) {
    const lo = BigInt(top) << 120n;
    const hi = lo | ((1n << 120n) - 1n);
    out.push(rows.filter((r) => r.row.prefix.first <= hi && r.row.prefix.last >= lo));
  }
  return out;
})();

/**
 * The most specific registry row holding SID i of t, and its index in SPECIAL_RANGES: what
 * classify(new Prefix(sid, 128)) gives, on words.
 */
export function classifySid(t: PackedSidTable, i: number): { row: SpaceRange; index: number } {
  for (const r of ROWS_BY_TOP_BYTE[t.w0[i]! >>> 24]!) if (sidInRange(t, i, r.range)) return r;
  throw new RangeError("the registry rows cover every address"); // cannot happen: see special.ts
}

/**
 * The registry rows that decide for at least one address of `p` (the most specific row wins for
 * each address), most specific first. Same reading as isGloballyReachable in src/net/special.ts:
 * a row counts when the part of (row ∩ p) that more specific rows leave uncovered is not empty.
 * Short cut for the common case: when no row lies inside p, the most specific row holding p
 * decides for all of it (a prefix of 8 bits or more only meets the rows of its top byte).
 * `r` is p as words, when the caller has them.
 */
export function decidingRows(p: Prefix, r: WordRange = wordRange(p)): SpaceRange[] {
  if (p.len >= 8) {
    let holder: SpaceRange | undefined;
    let inside = false;
    for (const c of ROWS_BY_TOP_BYTE[r.f0 >>> 24]!) {
      if (c.range.len > p.len) inside ||= isSubnetRange(c.range, r);
      else if (!holder && isSubnetRange(r, c.range)) holder = c.row;
    }
    if (holder && !inside) return [holder];
  }
  const rows = rangesOverlapping(p);
  return rows.filter((r) => {
    if (rows.some((c) => c.prefix.len > r.prefix.len && p.isSubnetOf(c.prefix))) return false;
    const inter = r.prefix.len >= p.len ? r.prefix : p.masked();
    const nested = rows.filter((c) => c.prefix.len > r.prefix.len && c.prefix.isSubnetOf(inter));
    let covered = 0n;
    for (const c of nested) {
      if (!nested.some((o) => o !== c && o.prefix.len < c.prefix.len && c.prefix.isSubnetOf(o.prefix))) covered += c.prefix.size;
    }
    return covered < inter.size;
  });
}

/** One cause found by a space rule: a subject and the registry row it falls in; `count` SIDs for stray SIDs. */
export interface SpaceHit {
  readonly subject: SpaceSubject;
  readonly row: SpaceRange;
  /** Stray SIDs of one node in one row are one hit; count says how many. */
  readonly count: number;
}

/**
 * Every (subject, row) whose row's category is in `categories`: one per block or locator, one per
 * node and row for SIDs outside every block and locator. A prefix that spans rows gets one hit per
 * row. The hits of all categories are found once per run; each rule takes its own.
 */
export function scanSpecialSpace(ctx: RuleContext, categories: ReadonlySet<SpaceCategory>): SpaceHit[] {
  return allSpaceHits(ctx).filter((h) => categories.has(h.row.category));
}

function allSpaceHits(ctx: RuleContext): readonly SpaceHit[] {
  const { prefixes, strays } = spaceSubjects(ctx, true);
  const t = ctx.packed.table;
  return ctx.shared("space-hits", () => {
    const hits: SpaceHit[] = [];
    for (const s of prefixes) {
      for (const row of decidingRows(s.prefix, s.range)) hits.push({ subject: s, row, count: 1 });
    }
    // stray SIDs by node (name rank) and row; the first of each gives the subject
    const rank = t.nodeRank;
    const byNodeRow = new Map<number, { subject: SpaceSubject; row: SpaceRange; count: number }>();
    let lastKey = -1; // neighbours are mostly of one node and row
    let last: { subject: SpaceSubject; row: SpaceRange; count: number } | undefined;
    for (const i of strays) {
      const { row, index } = classifySid(t, i);
      const k = rank[t.node[i]!]! * SPECIAL_RANGES.length + index;
      if (k === lastKey) last!.count++;
      else {
        last = byNodeRow.get(k);
        if (last) last.count++;
        else byNodeRow.set(k, (last = { subject: straySubject(ctx, i), row, count: 1 }));
        lastKey = k;
      }
    }
    hits.push(...byNodeRow.values());
    return hits;
  });
}

/** What the hit is, for messages: the subject, or "N SIDs of node" for a group of stray SIDs. */
export function hitLabel(h: SpaceHit): string {
  return h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.node} (first ${h.subject.text})` : h.subject.label;
}
