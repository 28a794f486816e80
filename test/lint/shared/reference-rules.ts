/**
 * The space, summary and completeness rules as they were written on the object views (ctx.sids,
 * ctx.locators), kept as the readable reference for the packed rules in src/lint/rules: the tests
 * run both on random tables and plans and require the same findings. Not used by the program.
 */
import { capacityReporter, reportCsidPools, reportLevelsAndPools } from "../../../src/lint/rules/capacity.js";
import { RESERVED } from "../../../src/lint/rules/reserved-space.js";
import { Prefix, collapse, comparePrefixes, coveringPrefix } from "../../../src/net/prefix.js";
import { type SpaceCategory, type SpaceRange, classify, rangesOverlapping } from "../../../src/net/special.js";
import { formatAddr } from "../../../src/net/text.js";
import { type Addr, getField } from "../../../src/net/uint128.js";
import type { SourceLocation } from "../../../src/plan/diagnostic.js";
import type { Block, Group, Plan, PoolKind } from "../../../src/plan/model.js";
import { rangeSize } from "../../../src/plan/normalize.js";
import { classifyCodepoint } from "../../../src/sid/behaviors.js";
import type { OwnedLocator, OwnedSid, Rule, RuleContext } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";
import { groupPlanPath } from "../../../src/lint/shared/summary.js";

// ---- locator-outside-block
/**
 * Containment questions against a set of prefixes in log time. Only the outermost prefixes are
 * kept (a prefix nested in another adds no address), sorted by first address; prefixes nest or are
 * disjoint, so the one candidate for a question is the last kept prefix starting at or before it.
 * An empty set contains nothing.
 */
export class PrefixIndex<T> {
  private readonly outer: { readonly prefix: Prefix; readonly value: T }[] = [];

  constructor(items: readonly { readonly prefix: Prefix; readonly value: T }[]) {
    const sorted = [...items].sort((a, b) => comparePrefixes(a.prefix, b.prefix));
    for (const it of sorted) {
      const top = this.outer[this.outer.length - 1];
      if (top && top.prefix.last >= it.prefix.first) continue; // nested in the previous outermost prefix
      this.outer.push(it);
    }
  }

  /** The outermost prefix of the set that holds all of `p`, if any. */
  containing(p: Prefix): { readonly prefix: Prefix; readonly value: T } | undefined {
    const c = this.candidate(p.first);
    return c && c.prefix.isSupernetOf(p) ? c : undefined;
  }

  /** The outermost prefix of the set that holds the address `a`, if any. */
  containingAddr(a: Addr): { readonly prefix: Prefix; readonly value: T } | undefined {
    const c = this.candidate(a);
    return c && c.prefix.contains(a) ? c : undefined;
  }

  private candidate(a: Addr): { readonly prefix: Prefix; readonly value: T } | undefined {
    let lo = 0;
    let hi = this.outer.length - 1;
    let best = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (this.outer[mid]!.prefix.first <= a) {
        best = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    return best >= 0 ? this.outer[best] : undefined;
  }
}

/** Key of a locator of a node (host bits ignored). */
const locKey = (node: string, p: Prefix) => `${node}|${p.masked().format()}`;

/**
 * Where a locator is: for a table, the first row (lowest row number) of a SID declared under it;
 * for a plan, or a locator with no SID row, the node. Built once in one pass over the SIDs.
 */
export function locatorLocator(ctx: RuleContext): (l: OwnedLocator) => SourceLocation {
  const first = new Map<string, OwnedSid>();
  for (const s of ctx.sids) {
    const loc = s.entry.locator;
    if (!loc || s.entry.row === undefined) continue;
    const k = locKey(s.node, loc);
    const prev = first.get(k);
    if (!prev || (prev.entry.row ?? 0) > s.entry.row) first.set(k, s);
  }
  return (l) => {
    const s = first.get(locKey(l.node, l.entry.prefix));
    return s ? ctx.locateSid(s) : ctx.locateNode(l.node);
  };
}

/**
 * The locators grouped by prefix and algorithm, with every node that holds each (anycast members
 * share one). Keeps the address order of ctx.locators; holders sorted by name.
 */
export function locatorsByPrefix(ctx: RuleContext): { prefix: Prefix; algorithm: number; holders: OwnedLocator[] }[] {
  const map = new Map<string, { prefix: Prefix; algorithm: number; holders: OwnedLocator[] }>();
  for (const l of ctx.locators) {
    const k = `${l.entry.algorithm}|${l.entry.prefix.masked().format()}`;
    let g = map.get(k);
    if (!g) {
      g = { prefix: l.entry.prefix.masked(), algorithm: l.entry.algorithm, holders: [] };
      map.set(k, g);
    }
    if (!g.holders.some((h) => h.node === l.node)) g.holders.push(l);
  }
  const out = [...map.values()];
  for (const g of out) g.holders.sort((a, b) => (a.node < b.node ? -1 : a.node > b.node ? 1 : 0));
  return out;
}

export const locatorOutsideBlock: Rule = {
  meta: RULES["locator-outside-block"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    const where = locatorLocator(ctx);
    const names = plan.blocks.map((b) => `${b.name} ${b.prefix.format()}`).join(", ");
    // One finding per locator prefix: anycast members share one locator and one cause.
    for (const g of locatorsByPrefix(ctx)) {
      // RFC 8986 §3.1: the locator is B:N, so it must sit inside a block B.
      if (blocks.containing(g.prefix)) continue;
      const loc = g.prefix.format();
      const nodes = g.holders.map((h) => h.node);
      ctx.report({
        message: `locator ${loc} (algorithm ${g.algorithm}) of ${nodes.join(", ")} lies outside every declared block (${names || "the plan declares none"})`,
        location: where(g.holders[0]!),
        objects: [...nodes, loc],
        hint: "take the locator from one of the plan's blocks, or declare the block it comes from",
        data: { locator: loc, algorithm: g.algorithm, nodes: nodes.join(",") },
      });
    }
  },
};

// ---- reserved-space
/** Something the space rules judge: a block, a locator outside every block, or one stray SID (/128). */
export interface SpaceSubject {
  readonly kind: "block" | "locator" | "sid";
  readonly prefix: Prefix;
  /** For people: "block metro", "locator 5f00::/64 of r1", "SID 5f00::1 of r1". */
  readonly label: string;
  readonly objects: readonly string[];
  readonly location: SourceLocation;
  /** The stray SID, for kind "sid". */
  readonly sid?: OwnedSid;
}

/**
 * The subjects of the space rules, outermost first, so one cause gives one finding: the declared
 * blocks of the plan (or, when `inferBlocks` is set and there is no plan, the blocks a bare table
 * implies: each SID's prefix of its advertised block length, else its locator); then every locator
 * outside those blocks; then every SID outside all of them. Deterministic order.
 */
export function spaceSubjects(ctx: RuleContext, inferBlocks: boolean): { prefixes: SpaceSubject[]; strays: SpaceSubject[] } {
  const plan = ctx.input.plan;
  const prefixes: SpaceSubject[] = [];
  if (plan) {
    for (const b of plan.blocks) {
      prefixes.push({ kind: "block", prefix: b.prefix, label: `block ${b.name} (${b.prefix.format()})`, objects: [b.name, b.prefix.format()], location: ctx.locatePlan(["blocks", b.index, "prefix"]) });
    }
  } else if (inferBlocks) {
    const seen = new Map<string, { prefix: Prefix; sid: OwnedSid }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      const p = st && st.block >= 1 && st.block <= 128 ? new Prefix(s.entry.sid, st.block).masked() : s.entry.locator?.masked();
      if (!p) continue;
      const k = p.format();
      const prev = seen.get(k);
      if (!prev || (prev.sid.entry.row ?? 0) > (s.entry.row ?? 0)) seen.set(k, { prefix: p, sid: s });
    }
    for (const [k, v] of [...seen.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      prefixes.push({ kind: "block", prefix: v.prefix, label: `block ${k} (from the SID structure of the table)`, objects: [k], location: ctx.locateSid(v.sid) });
    }
  }
  const blocks = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p })));
  const where = locatorLocator(ctx);
  const locs: SpaceSubject[] = [];
  for (const g of locatorsByPrefix(ctx)) {
    if (blocks.containing(g.prefix)) continue;
    const nodes = g.holders.map((h) => h.node);
    locs.push({ kind: "locator", prefix: g.prefix, label: `locator ${g.prefix.format()} of ${nodes.join(", ")}`, objects: [...nodes, g.prefix.format()], location: where(g.holders[0]!) });
  }
  prefixes.push(...locs);
  const covered = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p })));
  const strays: SpaceSubject[] = [];
  for (const s of ctx.sids) {
    if (covered.containingAddr(s.entry.sid)) continue;
    const a = formatAddr(s.entry.sid);
    strays.push({ kind: "sid", prefix: new Prefix(s.entry.sid, 128), label: `SID ${a} of ${s.node}`, objects: [s.node, a], location: ctx.locateSid(s), sid: s });
  }
  return { prefixes, strays };
}

/**
 * The registry rows that decide for at least one address of `p` (the most specific row wins for
 * each address), most specific first. Same reading as isGloballyReachable in src/net/special.ts:
 * a row counts when the part of (row ∩ p) that more specific rows leave uncovered is not empty.
 */
export function decidingRows(p: Prefix): SpaceRange[] {
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
 * node and row for SIDs outside every block and locator. A prefix that spans rows gets one hit per row.
 */
export function scanSpecialSpace(ctx: RuleContext, categories: ReadonlySet<SpaceCategory>): SpaceHit[] {
  const { prefixes, strays } = spaceSubjects(ctx, true);
  const hits: SpaceHit[] = [];
  for (const s of prefixes) {
    for (const row of decidingRows(s.prefix)) if (categories.has(row.category)) hits.push({ subject: s, row, count: 1 });
  }
  const byNodeRow = new Map<string, { subject: SpaceSubject; row: SpaceRange; count: number }>();
  for (const s of strays) {
    const row = classify(s.prefix); // a /128 always has a row
    if (!categories.has(row.category)) continue;
    const k = `${s.sid!.node}|${row.text}`;
    const prev = byNodeRow.get(k);
    if (prev) prev.count++;
    else byNodeRow.set(k, { subject: s, row, count: 1 });
  }
  hits.push(...byNodeRow.values());
  return hits;
}

/** What the hit is, for messages: the subject, or "N SIDs of node" for a group of stray SIDs. */
export function hitLabel(h: SpaceHit): string {
  return h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.sid!.node} (first ${formatAddr(h.subject.sid!.entry.sid)})` : h.subject.label;
}

// RESERVED is the rule's own (unchanged in the port)

export const reservedSpace: Rule = {
  meta: RULES["reserved-space"].meta,
  check(ctx) {
    for (const h of scanSpecialSpace(ctx, RESERVED)) {
      const p = h.subject.kind === "sid" ? formatAddr(h.subject.sid!.entry.sid) : h.subject.prefix.format();
      ctx.report({
        message: `${hitLabel(h)} falls in ${h.row.text} (${h.row.name}, ${h.row.source}), which is not SID space`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: "carve SIDs from 5f00::/16 (RFC 9602) or from the operator's own global unicast space",
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, category: h.row.category, count: h.count },
      });
    }
  },
};

// ---- documentation-space
const DOCUMENTATION: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>(["documentation"]);

export const documentationSpace: Rule = {
  meta: RULES["documentation-space"].meta,
  check(ctx) {
    const production = ctx.input.plan?.lint.production === true;
    for (const h of scanSpecialSpace(ctx, DOCUMENTATION)) {
      const p = h.subject.kind === "sid" ? formatAddr(h.subject.sid!.entry.sid) : h.subject.prefix.format();
      // RFC 3849; RFC 9637 §4: documentation prefixes are not for real traffic.
      ctx.report({
        message: `${hitLabel(h)} lies in the documentation prefix ${h.row.text} (${h.row.source})${production ? ", and the plan is marked for production" : ""}`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: production ? "renumber into 5f00::/16 (RFC 9602) or the operator's own space before rollout" : "fine for examples and labs; renumber before production",
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, count: h.count, production: production ? "true" : "false" },
        ...(production ? { severity: "error" as const } : {}),
      });
    }
  },
};

// ---- edge-filtering
const EDGE: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>(["srv6-sid", "unique-local", "global-unicast"]);

/** What to say per kind of space, with its source. */
const NOTE: Readonly<Record<string, { say: string; source: string }>> = {
  // RFC 9602 §5-7: the block is set aside for SIDs, not globally reachable, filtered at the edge.
  "srv6-sid": { say: "the range set aside for SRv6 SIDs: fine; it is not globally reachable, and every domain edge must still drop packets to the block", source: "RFC 9602 §5-7" },
  // RFC 4193 §3.2: the Global ID must be pseudo-random; Abstract: not expected to be routable on
  // the global Internet; §4.3 is about filtering at the site border.
  "unique-local": { say: "unique-local space: its 40-bit Global ID must be pseudo-random (never sequential or well known), it is not globally routed, and the edge must drop it", source: "RFC 4193 §3.2, §4.3" },
  // RFC 8754 §5.1: drop packets to the SID block at every external interface.
  "global-unicast": { say: "global unicast space: reachable from outside unless every external interface drops packets to the block", source: "RFC 8754 §5.1; RFC 9602 §7" },
};

export const edgeFiltering: Rule = {
  meta: RULES["edge-filtering"].meta,
  check(ctx) {
    for (const h of scanSpecialSpace(ctx, EDGE)) {
      const note = NOTE[h.row.category]!;
      const p = h.subject.kind === "sid" ? formatAddr(h.subject.sid!.entry.sid) : h.subject.prefix.format();
      ctx.report({
        message: `${hitLabel(h)} is in ${h.row.text}, ${note.say} (${note.source})`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: `drop packets to ${p} at every external interface of the domain`,
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, category: h.row.category, count: h.count },
      });
    }
  },
};

// ---- infrastructure-collision
interface CollisionItem {
  readonly prefix: Prefix;
  readonly subject?: SpaceSubject;
  /** Index into plan.infrastructure for an infrastructure prefix. */
  readonly infra?: number;
}

export const infrastructureCollision: Rule = {
  meta: RULES["infrastructure-collision"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    if (plan.infrastructure.length === 0) return;
    const { prefixes, strays } = spaceSubjects(ctx, false);
    const items: CollisionItem[] = [
      ...plan.infrastructure.map((x, i) => ({ prefix: x.prefix.masked(), infra: i })),
      ...[...prefixes, ...strays].map((s) => ({ prefix: s.prefix, subject: s })),
    ];
    items.sort((a, b) => (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : a.prefix.len - b.prefix.len));

    // Sweep with a stack of open prefixes: prefixes nest or are disjoint, so every overlapping
    // pair is an open prefix and a newcomer inside it.
    const hits = new Map<string, { subject: SpaceSubject; infra: number; count: number }>();
    const open: CollisionItem[] = [];
    for (const cur of items) {
      while (open.length > 0 && open[open.length - 1]!.prefix.last < cur.prefix.first) open.pop();
      for (const o of open) {
        const infra = o.infra ?? cur.infra;
        const subject = o.subject ?? cur.subject;
        if (infra === undefined || subject === undefined || (o.infra !== undefined) === (cur.infra !== undefined)) continue;
        // Stray SIDs of one node in one infrastructure prefix are one cause.
        const k = subject.kind === "sid" ? `sid|${subject.sid!.node}|${infra}` : `${subject.kind}|${subject.prefix.format()}|${infra}`;
        const prev = hits.get(k);
        if (prev) prev.count++;
        else hits.set(k, { subject, infra, count: 1 });
      }
      open.push(cur);
    }
    for (const h of hits.values()) {
      const x = plan.infrastructure[h.infra]!;
      const what = h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.sid!.node} (first ${h.subject.objects[1]})` : h.subject.label;
      // RFC 8986 §9: SID space must be distinct from infrastructure space.
      ctx.report({
        message: `${what} overlaps infrastructure prefix ${x.prefix.format()} (${x.name}, ${x.kind})`,
        location: h.subject.location,
        objects: [...h.subject.objects, x.name, x.prefix.format()],
        hint: "move the SID block (or the infrastructure prefix) so that the two do not overlap",
        data: { subject: h.subject.kind, prefix: h.subject.kind === "sid" ? h.subject.objects[1]! : h.subject.prefix.format(), infrastructure: x.name, infrastructurePrefix: x.prefix.format(), count: h.count },
      });
    }
  },
};

// ---- longest-match-theft
/** One prefix of the sweep: a locator (with its holders) or a declared infrastructure prefix. */
interface TheftItem {
  readonly prefix: Prefix;
  readonly kind: "locator" | "infrastructure";
  /** Holder nodes of a locator; empty for infrastructure. */
  readonly nodes: readonly string[];
  readonly algorithm: number;
  /** Name of an infrastructure entry; "" for a locator. */
  readonly name: string;
  readonly location: SourceLocation | undefined;
}

export const longestMatchTheft: Rule = {
  meta: RULES["longest-match-theft"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    const where = locatorLocator(ctx);
    const items: TheftItem[] = [];
    for (const g of locatorsByPrefix(ctx)) {
      items.push({ prefix: g.prefix, kind: "locator", nodes: g.holders.map((h) => h.node), algorithm: g.algorithm, name: "", location: where(g.holders[0]!) });
    }
    plan?.infrastructure.forEach((x, i) => {
      const location = ctx.input.fromTable ? undefined : ctx.locatePlan(["infrastructure", i, "prefix"]);
      items.push({ prefix: x.prefix.masked(), kind: "infrastructure", nodes: [], algorithm: -1, name: x.name, location });
    });
    items.sort((a, b) => (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : a.prefix.len - b.prefix.len));

    // SIDs per node in address order, to count what the thief takes (binary search).
    const sidsOf = new Map<string, OwnedSid[]>();
    for (const s of ctx.sids) {
      const list = sidsOf.get(s.node) ?? [];
      list.push(s);
      sidsOf.set(s.node, list);
    }
    const stolen = (nodes: readonly string[], algorithm: number, inner: Prefix): OwnedSid[] => {
      const out: OwnedSid[] = [];
      for (const n of nodes) {
        const list = sidsOf.get(n) ?? [];
        let lo = 0;
        let hi = list.length;
        while (lo < hi) {
          const mid = (lo + hi) >> 1;
          if (list[mid]!.entry.sid < inner.first) lo = mid + 1;
          else hi = mid;
        }
        for (let i = lo; i < list.length && list[i]!.entry.sid <= inner.last; i++) if (list[i]!.entry.algorithm === algorithm) out.push(list[i]!);
      }
      return out;
    };

    // Sweep in address order with a stack of open prefixes: each open prefix contains the next
    // one up, so a new item meets exactly the prefixes that contain it (n log n for the sort).
    // One finding per robbed locator, however many prefixes rob it.
    const robbed = new Map<TheftItem, { thieves: TheftItem[]; taken: OwnedSid[] }>();
    const open: TheftItem[] = [];
    for (const cur of items) {
      while (open.length > 0 && open[open.length - 1]!.prefix.last < cur.prefix.first) open.pop();
      for (const outer of open) {
        if (outer.kind !== "locator") continue; // only a locator can be robbed
        if (cur.prefix.len <= outer.prefix.len) continue; // equal prefixes are locator-overlap's and infrastructure-collision's
        // The same node's own, same-algorithm, more specific locator routes to the same place.
        if (cur.kind === "locator" && cur.algorithm === outer.algorithm && cur.nodes.every((n) => outer.nodes.includes(n))) continue;
        const r = robbed.get(outer) ?? { thieves: [], taken: [] };
        r.thieves.push(cur);
        r.taken.push(...stolen(outer.nodes, outer.algorithm, cur.prefix));
        robbed.set(outer, r);
      }
      open.push(cur);
    }
    const describe = (outer: TheftItem, t: TheftItem) =>
      t.kind === "infrastructure"
        ? `infrastructure prefix ${t.prefix.format()} (${t.name})`
        : t.nodes.every((n) => outer.nodes.includes(n))
          ? `locator ${t.prefix.format()} of the same node for algorithm ${t.algorithm}`
          : `locator ${t.prefix.format()} of ${t.nodes.join(", ")} (algorithm ${t.algorithm})`;
    for (const [outer, { thieves, taken }] of robbed) {
      const victim = outer.prefix.format();
      const first = thieves[0]!;
      const list = thieves.slice(0, 3).map((t) => describe(outer, t)).join("; ") + (thieves.length > 3 ? `; and ${thieves.length - 3} more` : "");
      const sids = new Set(taken).size; // nested thieves may count a SID twice
      // RFC 9352 §5 / RFC 9513 §5: the locator must be the longest match for its SIDs.
      ctx.report({
        message: `locator ${victim} of ${outer.nodes.join(", ")} (algorithm ${outer.algorithm}) is not the longest match for all of its space: ${list} ${thieves.length > 1 ? "are" : "is"} more specific${sids ? ` and take${thieves.length > 1 ? "" : "s"} ${sids} of its SIDs` : ""}`,
        location: first.location ?? (taken[0] ? ctx.locateSid(taken[0]) : (outer.location ?? { file: ctx.input.file })),
        objects: [...outer.nodes, victim, ...thieves.slice(0, 3).flatMap((t) => [...(t.kind === "infrastructure" ? [t.name] : t.nodes), t.prefix.format()])],
        hint: first.kind === "infrastructure" ? "move the infrastructure prefix out of the SID block" : "give the locators disjoint space: a node's locators for different algorithms, and different nodes' locators, must not nest",
        data: { locator: victim, algorithm: outer.algorithm, thief: first.prefix.format(), thiefKind: first.kind, thieves: thieves.length, stolenSids: sids },
      });
    }
  },
};

// ---- block-aggregation
export const blockAggregation: Rule = {
  meta: RULES["block-aggregation"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    // The block length of a bare table: the most common advertised structure.block (the
    // shorter on ties, for a deterministic answer).
    const lengths = new Map<number, number>();
    for (const s of ctx.sids) {
      const b = s.entry.structure?.block;
      if (b !== undefined && b >= 1 && b <= 128) lengths.set(b, (lengths.get(b) ?? 0) + 1);
    }
    const modal = [...lengths.entries()].sort(([la, ca], [lb, cb]) => cb - ca || la - lb)[0]?.[0];
    const blocks = new PrefixIndex<Block>(plan?.blocks.map((b) => ({ prefix: b.prefix, value: b })) ?? []);
    if (!plan && modal === undefined) return; // no block length to judge by

    // One unit per locator (and per SID without a locator): its declared block, else its prefix
    // of the common block length.
    const unit = (p: Prefix): Prefix => blocks.containing(p)?.prefix ?? (modal !== undefined && p.len >= modal ? p.supernet(modal) : p.masked());
    const units = new Map<string, Prefix>();
    for (const g of locatorsByPrefix(ctx)) {
      const u = unit(g.prefix);
      units.set(u.format(), u);
    }
    for (const s of ctx.sids) {
      if (s.entry.locator) continue;
      const u = unit(new Prefix(s.entry.sid, 128));
      units.set(u.format(), u);
    }
    const merged = collapse([...units.values()]);
    if (merged.length <= 1) return;

    // SIDs per merged prefix (both sorted: one merge pass), to name the odd one out.
    const count = merged.map(() => 0);
    const firstSid = merged.map((): (typeof ctx.sids)[number] | undefined => undefined);
    let k = 0;
    for (const s of ctx.sids) {
      while (k < merged.length && merged[k]!.last < s.entry.sid) k++;
      if (k >= merged.length) break;
      if (!merged[k]!.contains(s.entry.sid)) continue;
      count[k]!++;
      const f = firstSid[k];
      if (!f || (f.entry.row ?? 0) > (s.entry.row ?? 0)) firstSid[k] = s;
    }
    let odd = merged.length - 1;
    for (let i = merged.length - 1; i >= 0; i--) if (count[i]! < count[odd]!) odd = i;
    const oddBlock = plan?.blocks.find((b) => b.prefix.isSubnetOf(merged[odd]!));
    const oddSid = firstSid[odd];
    const location: SourceLocation =
      !ctx.input.fromTable && oddBlock ? ctx.locatePlan(["blocks", oddBlock.index, "prefix"]) : oddSid ? ctx.locateSid(oddSid) : { file: ctx.input.file };
    const list = merged.map((p) => p.format());
    const cover = coveringPrefix(merged)!.format();
    // RFC 8754 §5.1: all SIDs from one block S/s, dropped at every external interface.
    ctx.report({
      message: `the domain's SIDs spread over ${merged.length} prefixes that do not aggregate (${list.slice(0, 5).join(", ")}${list.length > 5 ? ", ..." : ""}); every edge needs ${merged.length} filter entries, or the covering ${cover}, which holds other space too`,
      location,
      objects: list.slice(0, 5),
      hint: plan ? "move the blocks next to each other inside one prefix (e.g. consecutive /48s of one /46), or renumber the stray locators into a declared block" : "renumber the stray locators into the main block",
      data: { prefixes: merged.length, list: list.slice(0, 5).join(" "), covering: cover, smallest: list[odd]!, ...(modal !== undefined ? { blockLength: modal } : {}) },
    });
  },
};

// ---- anycast-mismatch
/** What must be equal across members: the address and what it does (behaviour, flavours, algorithm). */
const signature = (s: OwnedSid) => `${formatAddr(s.entry.sid)} ${s.entry.behavior}${s.entry.flavors.length ? "+" + [...s.entry.flavors].sort().join("+") : ""} a${s.entry.algorithm}`;

export const anycastMismatch: Rule = {
  meta: RULES["anycast-mismatch"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    const planNode = new Map(plan?.nodes.map((n) => [n.name, n]) ?? []);
    const groupIndex = new Map(plan?.anycast.map((a, i) => [a.name, i]) ?? []);
    const inTable = new Set(ctx.input.table.nodes.map((n) => n.node));

    // SIDs per node, in address order (ctx.sids is sorted), for range queries.
    const sidsOf = new Map<string, OwnedSid[]>();
    for (const s of ctx.sids) {
      const list = sidsOf.get(s.node) ?? [];
      list.push(s);
      sidsOf.set(s.node, list);
    }
    const under = (node: string, p: Prefix): OwnedSid[] => {
      const list = sidsOf.get(node) ?? [];
      let lo = 0;
      let hi = list.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (list[mid]!.entry.sid < p.first) lo = mid + 1;
        else hi = mid;
      }
      const out: OwnedSid[] = [];
      for (let i = lo; i < list.length && list[i]!.entry.sid <= p.last; i++) out.push(list[i]!);
      return out;
    };

    for (const g of locatorsByPrefix(ctx)) {
      const holders = g.holders.map((h) => h.node);
      // The plan anycast group of this locator: named on the locator (plan, JSON tables), or the
      // group that at least one holder of a shared locator belongs to.
      let group = g.holders.map((h) => h.entry.anycast).find((a) => a !== "");
      if (group === undefined && holders.length > 1) group = plan?.anycast.find((a) => holders.some((h) => a.members.includes(h)))?.name;
      if (holders.length < 2 && group === undefined) continue; // a node-specific locator
      const members = new Set(holders);
      const decl = group === undefined ? undefined : plan?.anycast.find((a) => a.name === group);
      // Declared members present in the table that serve the locator's algorithm must hold it too.
      for (const m of decl?.members ?? []) {
        if (inTable.has(m) && (planNode.get(m)?.algorithms ?? [g.algorithm]).includes(g.algorithm)) members.add(m);
      }
      if (members.size < 2) continue;
      const sets = new Map<string, { sids: OwnedSid[]; sigs: Set<string> }>();
      const union = new Map<string, OwnedSid>();
      for (const m of [...members].sort()) {
        const sids = under(m, g.prefix);
        const sigs = new Set(sids.map(signature));
        sets.set(m, { sids, sigs });
        for (const s of sids) if (!union.has(signature(s))) union.set(signature(s), s);
      }
      const short: { node: string; missing: string[] }[] = [];
      for (const [m, { sigs }] of sets) {
        const missing = [...union.keys()].filter((k) => !sigs.has(k));
        if (missing.length > 0) short.push({ node: m, missing });
      }
      if (short.length === 0) continue;
      const loc = g.prefix.format();
      const total = short.reduce((n, s) => n + s.missing.length, 0);
      const first = short[0]!;
      // Locate at the member that lacks something: its first SID under the locator, or the node.
      const firstSid = sets.get(first.node)!.sids[0];
      const location =
        !ctx.input.fromTable && group !== undefined && groupIndex.has(group)
          ? ctx.locatePlan(["anycast", groupIndex.get(group)!])
          : firstSid
            ? ctx.locateSid(firstSid)
            : ctx.locateNode(first.node);
      const detail = short
        .slice(0, 3)
        .map((s) => `${s.node} lacks ${s.missing.length} (${s.missing.slice(0, 2).join(", ")}${s.missing.length > 2 ? ", ..." : ""})`)
        .join("; ");
      // RFC 9352 §6, RFC 9513 §6: identical SIDs on every node sharing the anycast locator.
      ctx.report({
        message: `members of anycast locator ${loc}${group ? ` (group ${group})` : ""} carry different SIDs under it: ${detail}${short.length > 3 ? `; and ${short.length - 3} more members` : ""}`,
        location,
        objects: [loc, ...short.map((s) => s.node), ...(group ? [group] : [])],
        hint: "instantiate the same SIDs (address, behaviour, flavours) on every member, or give the odd member a node-specific locator for them",
        data: { locator: loc, algorithm: g.algorithm, members: members.size, differing: short.length, missing: total, ...(group ? { group } : {}) },
      });
    }
  },
};

// ---- missing-end
/** True when the SID is an End SID, in any flavour: by name, or by its codepoint when the name is not ours. */
export function isBehavior(s: OwnedSid, name: string): boolean {
  if (s.entry.behavior === name) return true;
  const cp = s.entry.codepoint;
  if (cp === undefined || !Number.isInteger(cp) || cp < 0 || cp > 0xffff) return false;
  const c = classifyCodepoint(cp);
  return c.kind === "behavior" && c.behavior === name;
}

export const missingEnd: Rule = {
  meta: RULES["missing-end"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    const planNode = new Map(plan?.nodes.map((n) => [n.name, n]) ?? []);
    // Locators several nodes hold (anycast): End SIDs under them do not name one node.
    const shared = new PrefixIndex(
      locatorsByPrefix(ctx)
        .filter((g) => g.holders.length > 1 || g.holders.some((h) => h.entry.anycast !== ""))
        .map((g) => ({ prefix: g.prefix, value: g })),
    );
    const algos = new Map<string, Set<number>>();
    const have = new Map<string, Set<number>>();
    const add = (m: Map<string, Set<number>>, node: string, a: number) => {
      const set = m.get(node) ?? new Set<number>();
      set.add(a);
      m.set(node, set);
    };
    for (const n of ctx.input.table.nodes) {
      for (const a of planNode.get(n.node)?.algorithms ?? []) add(algos, n.node, a);
      for (const l of n.locators) add(algos, n.node, l.algorithm);
    }
    for (const s of ctx.sids) {
      add(algos, s.node, s.entry.algorithm);
      if (isBehavior(s, "End") && !shared.containingAddr(s.entry.sid)) add(have, s.node, s.entry.algorithm);
    }
    for (const [node, set] of [...algos.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      for (const a of [...set].sort((x, y) => x - y)) {
        if (have.get(node)?.has(a)) continue;
        // RFC 9513 §8: every SRv6 router SHOULD advertise at least one End SID; RFC 9350 §14.2: per Flex-Algo.
        ctx.report({
          message: `node ${node} has no End SID of its own for algorithm ${a}`,
          location: ctx.locateNode(node),
          objects: [node],
          hint: `add an End SID (any flavour) under ${node}'s algorithm ${a} locator`,
          data: { node, algorithm: a },
        });
      }
    }
  },
};

// ---- missing-endx
export const missingEndx: Rule = {
  meta: RULES["missing-endx"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    const algosOf = new Map(plan.nodes.map((n) => [n.name, n.algorithms]));
    const inTable = new Set(ctx.input.table.nodes.map((n) => n.node));
    // node|algorithm|neighbor -> interfaces named in the SIDs' context ("" when none is named)
    const endx = new Map<string, Set<string>>();
    for (const s of ctx.sids) {
      if (!isBehavior(s, "End.X")) continue;
      const nb = s.entry.context["neighbor"];
      if (nb === undefined) continue;
      const k = `${s.node}|${s.entry.algorithm}|${nb}`;
      const set = endx.get(k) ?? new Set<string>();
      set.add(s.entry.context["interface"] ?? "");
      endx.set(k, set);
    }
    for (const l of plan.links) {
      const [a, b] = l.ends;
      const algos = l.algorithms ?? (algosOf.get(a.node) ?? []).filter((x) => (algosOf.get(b.node) ?? []).includes(x));
      l.ends.forEach((me, j) => {
        // A node the inventory does not hold at all is not deployed yet: nothing to judge.
        if (ctx.input.fromTable && !inTable.has(me.node)) return;
        const peer = l.ends[1 - j]!;
        const missing = algos.filter((alg) => {
          const set = endx.get(`${me.node}|${alg}|${peer.node}`);
          if (!set) return true;
          // Parallel links are told apart by interface: a SID naming another interface is not this link's.
          return me.iface !== undefined && !set.has(me.iface) && !set.has("");
        });
        if (missing.length === 0) return;
        // RFC 9350 §14.2: one End.X SID per (non-pruned) link and Flex-Algo for LFA.
        ctx.report({
          message: `link ${l.name}: ${me.node}${me.iface ? ` (${me.iface})` : ""} has no End.X SID towards ${peer.node} for algorithm${missing.length > 1 ? "s" : ""} ${missing.join(", ")}`,
          location: ctx.input.fromTable ? ctx.locateNode(me.node) : ctx.locatePlan(["links", l.index, "ends", j]),
          objects: [me.node, peer.node, l.name],
          hint: `add an End.X SID on ${me.node} with context neighbor=${peer.node}${me.iface ? `;interface=${me.iface}` : ""} for each algorithm`,
          data: { link: l.name, node: me.node, neighbor: peer.node, algorithms: missing.join(","), count: missing.length },
        });
      });
    }
  },
};

// ---- missing-vrf-sid
/** The behaviours that serve each family: a per-family table lookup, or the combined one. */
const SERVES = { ipv4: ["End.DT4", "End.DT46"], ipv6: ["End.DT6", "End.DT46"] } as const;

export const missingVrfSid: Rule = {
  meta: RULES["missing-vrf-sid"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    const inTable = new Set(ctx.input.table.nodes.map((n) => n.node));
    // node|vrf -> "behavior|algorithm" of its decapsulation SIDs
    const dt = new Map<string, Set<string>>();
    for (const s of ctx.sids) {
      const vrf = s.entry.context["vrf"];
      if (vrf === undefined) continue;
      const b = ["End.DT4", "End.DT6", "End.DT46"].find((x) => isBehavior(s, x));
      if (!b) continue;
      const k = `${s.node}|${vrf}`;
      const set = dt.get(k) ?? new Set<string>();
      set.add(`${b}|${s.entry.algorithm}`);
      dt.set(k, set);
    }
    plan.vrfs.forEach((v, i) => {
      v.pes.forEach((pe, j) => {
        if (ctx.input.fromTable && !inTable.has(pe)) return; // PE not in the inventory yet
        const have = dt.get(`${pe}|${v.name}`) ?? new Set<string>();
        const unserved = v.families.filter((f) => !SERVES[f].some((b) => have.has(`${b}|${v.algorithm}`)));
        if (unserved.length === 0) return;
        const expected = v.families.length === 2 && v.mode === "combined" ? ["End.DT46"] : unserved.map((f) => (f === "ipv4" ? "End.DT4" : "End.DT6"));
        const elsewhere = [...have].filter((x) => !x.endsWith(`|${v.algorithm}`));
        // RFC 9252 §5: the egress PE advertises a per-VRF End.DT4/End.DT6/End.DT46 service SID.
        ctx.report({
          message: `PE ${pe} has no ${expected.join(" or ")} SID for VRF ${v.name} (algorithm ${v.algorithm}), so ${unserved.join(" and ")} traffic of the VRF cannot be decapsulated there${elsewhere.length ? `; it has ${elsewhere.map((x) => x.replace("|", " under algorithm ")).join(", ")}` : ""}`,
          location: ctx.input.fromTable ? ctx.locateNode(pe) : ctx.locatePlan(["vrfs", i, "pes", j]),
          objects: [pe, v.name],
          hint: `add ${expected.join(" and ")} with context vrf=${v.name} on ${pe}`,
          data: { vrf: v.name, pe, missing: expected.join(","), families: unserved.join(","), algorithm: v.algorithm },
        });
      });
    });
  },
};

// ---- capacity
// Only the C-SID counting changed in the port (object views -> packed columns); the threshold,
// the level and pool findings and the GIB/LIB findings are the rule's own (capacity.ts exports).
export const capacity: Rule = {
  meta: RULES["capacity"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    const r = capacityReporter(ctx);
    reportLevelsAndPools(ctx, r);

    // GIB and LIB of compressed blocks (RFC 9800 §5), counted from the table so that an inventory
    // linted with --plan is judged too. Two-C-SID layouts: one global C-SID per locator (anycast
    // locators count once), local C-SIDs per locator; one-C-SID layouts: every SID's C-SID
    // (node + function) is global.
    const compressed = plan.blocks.filter((b) => b.layout.kind === "compressed");
    if (compressed.length === 0) return;
    const index = new PrefixIndex(compressed.map((b) => ({ prefix: b.prefix, value: b })));
    const globals = new Map<string, Set<bigint>>();
    const locals = new Map<string, Map<string, Set<bigint>>>(); // block -> "node|locator" -> local C-SIDs
    for (const l of ctx.locators) {
      const b = index.containing(l.entry.prefix)?.value;
      if (!b || b.layout.kind !== "compressed" || !b.layout.twoCsid) continue;
      const L = b.layout;
      if (l.entry.prefix.len < L.blockBits + L.csidBits) continue;
      const set = globals.get(b.name) ?? new Set<bigint>();
      set.add(getField(l.entry.prefix.first, L.blockBits, L.csidBits));
      globals.set(b.name, set);
    }
    for (const s of ctx.sids) {
      const b = index.containingAddr(s.entry.sid)?.value;
      if (!b || b.layout.kind !== "compressed") continue;
      const L = b.layout;
      if (L.twoCsid) {
        if (L.blockBits + 2 * L.csidBits > 128) continue;
        const local = getField(s.entry.sid, L.blockBits + L.csidBits, L.csidBits);
        if (local === 0n) continue; // the node's own End SID: global C-SID alone (RFC 9800 §8)
        const key = `${s.node}|${getField(s.entry.sid, L.blockBits, L.csidBits).toString(16)}`;
        const perNode = locals.get(b.name) ?? new Map<string, Set<bigint>>();
        const set = perNode.get(key) ?? new Set<bigint>();
        set.add(local);
        perNode.set(key, set);
        locals.set(b.name, perNode);
      } else {
        const set = globals.get(b.name) ?? new Set<bigint>();
        set.add(getField(s.entry.sid, L.blockBits, L.csidBits));
        globals.set(b.name, set);
      }
    }
    reportCsidPools(ctx, r, compressed, { globals, locals });
  },
};

// ---- summary-leak
/** True when `place` is the group `group` or lies below it ("north/quay" is under "north"). */
export function isUnder(place: string, group: string): boolean {
  return place === group || place.startsWith(group + "/");
}

/** A locator prefix (one per prefix and algorithm) with its holders. */
export type LocatorGroup = ReturnType<typeof locatorsByPrefix>[number];

/**
 * Which groups each locator belongs to: a locator is a member of a group when at least one of its
 * holders sits in the group or below it (plan places). Holders the plan does not know belong to
 * no group. Returns, per group path, its member locators in address order.
 */
export function membersByGroup(plan: Plan, locs: readonly LocatorGroup[]): Map<string, LocatorGroup[]> {
  const placeOf = new Map(plan.nodes.map((n) => [n.name, n.place]));
  const out = new Map<string, LocatorGroup[]>();
  for (const g of plan.groups) out.set(g.path, []);
  for (const l of locs) {
    const groups = new Set<string>();
    for (const h of l.holders) {
      const place = placeOf.get(h.node);
      if (!place) continue;
      const parts = place.split("/");
      for (let i = 1; i <= parts.length; i++) groups.add(parts.slice(0, i).join("/"));
    }
    for (const g of groups) out.get(g)?.push(l);
  }
  return out;
}

/**
 * The locator groups inside `p` that are not in `own`: how many, and the first `sample` of them in
 * address order. `sorted` is in address order (first address, then shorter first); `ownList` lists
 * `own`. Two binary searches count what lies inside, so the cost is the group's own size plus the
 * sample, not the size of `p` (a summary that wrongly covers a whole block stays cheap).
 */
export function foreignInside(sorted: readonly LocatorGroup[], p: Prefix, own: ReadonlySet<LocatorGroup>, ownList: readonly LocatorGroup[], sample = 5): { count: number; sample: LocatorGroup[] } {
  const lowerBound = (pred: (l: LocatorGroup) => boolean) => {
    let lo = 0;
    let hi = sorted.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (pred(sorted[mid]!)) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  let lo = lowerBound((l) => l.prefix.first < p.first);
  // Prefixes starting at p's first address but shorter contain p rather than lie in it.
  while (lo < sorted.length && sorted[lo]!.prefix.first === p.first && sorted[lo]!.prefix.len < p.len) lo++;
  const hi = lowerBound((l) => l.prefix.first <= p.last);
  const ownInside = ownList.filter((l) => l.prefix.isSubnetOf(p)).length;
  const out: LocatorGroup[] = [];
  for (let i = lo; i < hi && out.length < sample; i++) if (!own.has(sorted[i]!)) out.push(sorted[i]!);
  return { count: Math.max(0, hi - lo - ownInside), sample: out };
}

/** True when the block serves (part of) the group: no group limit, or a limit above or below it. */
export function blockServes(b: Block, g: Group): boolean {
  return b.groups.length === 0 || b.groups.some((bg) => isUnder(g.path, bg) || isUnder(bg, g.path));
}

/**
 * The natural summary of a group in a block for one algorithm: the block bits, the algorithm's
 * index in `algorithm-bits`, then the level values of the group and its ancestors, each at its
 * level's width; length = block + algorithm bits + the levels down to the group. Undefined when a
 * group value is unknown.
 */
export function naturalSummary(plan: Plan, groupValues: ReadonlyMap<string, bigint>, g: Group, b: Block, algorithm: number): Prefix | undefined {
  const parts = g.path.split("/");
  let v = 0n;
  let bits = 0;
  for (let i = 0; i < parts.length; i++) {
    const gv = groupValues.get(parts.slice(0, i + 1).join("/"));
    const level = plan.levels[i];
    if (gv === undefined || !level) return undefined;
    v = (v << BigInt(level.bits)) | gv;
    bits += level.bits;
  }
  const idx = b.algorithms.indexOf(algorithm);
  if (idx < 0) return undefined;
  const len = b.prefix.len + b.algorithmBits + bits;
  if (len > 128) return undefined;
  const field = (BigInt(idx) << BigInt(bits)) | v;
  return new Prefix(b.prefix.first | (field << BigInt(128 - len)), len);
}

const names = (ls: readonly LocatorGroup[]) => [...new Set(ls.flatMap((l) => l.holders.map((h) => h.node)))];
const few = (xs: readonly string[]) => xs.slice(0, 5).join(", ") + (xs.length > 5 ? `, and ${xs.length - 5} more` : "");

export const summaryLeak: Rule = {
  meta: RULES["summary-leak"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    const alloc = ctx.input.allocation;
    const locs = locatorsByPrefix(ctx); // address order
    const members = membersByGroup(plan, locs);
    const where = locatorLocator(ctx);
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    const locate = (g: Group, declared: boolean, at: OwnedLocator) =>
      ctx.input.fromTable ? where(at) : ctx.locatePlan([...groupPlanPath(g.path), ...(declared ? ["summary"] : [])]);

    const judge = (g: Group, s: Prefix, declared: boolean, mine: readonly LocatorGroup[], own: ReadonlySet<LocatorGroup>, ownList: readonly LocatorGroup[], context: string, extra: Record<string, string | number>) => {
      const text = s.format();
      const kind = declared ? "declared" : "natural";
      // Every member locator under the summary (RFC 5375 §2.4: aggregation).
      const outside = mine.filter((l) => !l.prefix.isSubnetOf(s));
      if (outside.length > 0) {
        const who = names(outside);
        ctx.report({
          message: `${outside.length} locator${outside.length > 1 ? "s" : ""} of group ${g.path} ${outside.length > 1 ? "lie" : "lies"} outside its ${kind} summary ${text}${context}: ${few(outside.map((l) => `${l.prefix.format()} (${l.holders.map((h) => h.node).join(", ")})`))}`,
          location: locate(g, declared, outside[0]!.holders[0]!),
          objects: [g.path, text, ...who.slice(0, 5)],
          hint: declared ? "widen or move the summary, or move the nodes into the group's space" : "give the nodes values inside the group, or move them to the group they are numbered in",
          data: { group: g.path, summary: text, kind, direction: "outside", count: outside.length, ...extra },
        });
      }
      // No other node's locator under it.
      const foreign = foreignInside(locs, s, own, ownList);
      if (foreign.count > 0) {
        const who = names(foreign.sample);
        const more = foreign.count > foreign.sample.length ? `, and ${foreign.count - foreign.sample.length} more` : "";
        ctx.report({
          message: `${kind} summary ${text} of group ${g.path}${context} also covers ${foreign.count} locator${foreign.count > 1 ? "s" : ""} of other nodes: ${foreign.sample.map((l) => `${l.prefix.format()} (${l.holders.map((h) => h.node).join(", ")})`).join(", ")}${more}`,
          location: locate(g, declared, foreign.sample[0]!.holders[0]!),
          objects: [g.path, text, ...who.slice(0, 5)],
          hint: "narrow the summary, or renumber the foreign nodes out of it",
          data: { group: g.path, summary: text, kind, direction: "foreign", count: foreign.count, ...extra },
        });
      }
    };

    for (const g of plan.groups) {
      const mine = members.get(g.path) ?? [];
      const own = new Set(mine);
      if (g.summary) {
        const s = g.summary.masked();
        // A declared summary is one prefix: it speaks for the members in the block it lies in (all
        // members when it lies in no block or spans several).
        const inBlock = blocks.containing(s);
        const scoped = inBlock ? mine.filter((l) => l.prefix.isSubnetOf(inBlock.prefix)) : mine;
        judge(g, s, true, scoped, own, mine, inBlock ? ` (block ${inBlock.value.name})` : "", {});
      }
      if (!alloc) continue; // natural summaries need the group values the allocation handed out
      for (const b of plan.blocks) {
        if (!blockServes(b, g)) continue;
        for (const a of b.algorithms) {
          const s = naturalSummary(plan, alloc.groupValues, g, b, a);
          if (!s || (g.summary && g.summary.equals(s))) continue;
          const scoped = mine.filter((l) => l.algorithm === a && l.prefix.isSubnetOf(b.prefix));
          judge(g, s, false, scoped, own, mine, ` (block ${b.name}, algorithm ${a})`, { block: b.name, algorithm: a });
        }
      }
    }
  },
};

// ---- summary-unclean
export const summaryUnclean: Rule = {
  meta: RULES["summary-unclean"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    if (!plan) return; // groups come from the plan; a bare table has none
    const locs = locatorsByPrefix(ctx); // address order
    const members = membersByGroup(plan, locs);
    const where = locatorLocator(ctx);
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    for (const g of plan.groups) {
      const mine = members.get(g.path) ?? [];
      if (mine.length === 0) continue;
      const own = new Set(mine);
      // One summary per block and algorithm: locators of different blocks never share one.
      const parts = new Map<string, { block: string; algorithm: number; list: LocatorGroup[] }>();
      for (const l of mine) {
        const b = blocks.containing(l.prefix)?.value.name ?? "";
        const k = `${b}|${l.algorithm}`;
        const part = parts.get(k) ?? { block: b, algorithm: l.algorithm, list: [] };
        part.list.push(l);
        parts.set(k, part);
      }
      for (const part of [...parts.values()].sort((a, b) => (a.block < b.block ? -1 : a.block > b.block ? 1 : a.algorithm - b.algorithm))) {
        const cover = coveringPrefix(part.list.map((l) => l.prefix))!;
        const swallowed = foreignInside(locs, cover, own, mine, 3);
        if (swallowed.count === 0) continue;
        const who = [...new Set(swallowed.sample.flatMap((l) => l.holders.map((h) => h.node)))];
        const text = cover.format();
        ctx.report({
          message: `the ${part.list.length} locators of group ${g.path}${part.block ? ` in block ${part.block}` : ""} (algorithm ${part.algorithm}) need ${text} to be summarised, which also covers ${swallowed.count} locator${swallowed.count > 1 ? "s" : ""} of other nodes (${who.slice(0, 3).join(", ")}${swallowed.count > swallowed.sample.length ? ", ..." : ""})`,
          location: ctx.input.fromTable ? where(swallowed.sample[0]!.holders[0]!) : ctx.locatePlan(groupPlanPath(g.path)),
          objects: [g.path, text, ...who.slice(0, 3)],
          hint: "renumber the foreign nodes out of the group's space, or the group's nodes into one contiguous part",
          data: { group: g.path, covering: text, swallows: swallowed.count, members: part.list.length, algorithm: part.algorithm, ...(part.block ? { block: part.block } : {}) },
        });
      }
    }
  },
};

/** The reference rules, by id. */
export const REFERENCE_RULES: readonly Rule[] = [
  locatorOutsideBlock,
  reservedSpace,
  documentationSpace,
  edgeFiltering,
  infrastructureCollision,
  longestMatchTheft,
  blockAggregation,
  anycastMismatch,
  missingEnd,
  missingEndx,
  missingVrfSid,
  capacity,
  summaryLeak,
  summaryUnclean,
];
