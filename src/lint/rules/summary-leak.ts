/**
 * A group's summary covers exactly its own locators: every member locator falls under it and no
 * other node's locator does. Checked for every declared `summary` and, when the input is a plan's
 * allocation, for every natural summary (block + algorithm bits + the group's level values). The
 * file also holds the group helpers the other summary rules share.
 */
import { Prefix } from "../../net/prefix.js";
import type { Block, Group, Plan } from "../../plan/model.js";
import type { OwnedLocator, Rule, RuleContext } from "../types.js";
import { PrefixIndex, locatorLocator, locatorsByPrefix } from "./locator-outside-block.js";

/** True when `place` is the group `group` or lies below it ("north/quay" is under "north"). */
export function isUnder(place: string, group: string): boolean {
  return place === group || place.startsWith(group + "/");
}

/** The plan path of a group: groups.north.groups.quay. */
export function groupPlanPath(path: string): (string | number)[] {
  return ["groups", ...path.split("/").flatMap((p, i) => (i === 0 ? [p] : ["groups", p]))];
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
  meta: {
    id: "summary-leak",
    severity: "error",
    summary: "Make each group's summary cover all of its own locators and none of anybody else's.",
    rationale:
      "A region or site border advertises its summary instead of each locator. A member locator outside the summary must leak as a more specific route; another node's locator inside it draws that node's traffic into the wrong region. Either way the aggregation the plan promises does not hold.",
    source: "RFC 5375 §2.4; RFC 3531 (aggregation); common practice for region summaries",
    needs: "plan",
  },
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
