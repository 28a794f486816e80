/** Group helpers the summary rules (summary-leak, summary-overlap, summary-unclean) share. */
import type { RuleContext } from "../types.js";
import { type LocatorGroup, locatorGroups } from "./locators.js";
import { type WordRange, compareFirst, endsBefore, isSubnetRange } from "./prefixes.js";

/** The plan path of a group: groups.north.groups.quay. */
export function groupPlanPath(path: string): (string | number)[] {
  return ["groups", ...path.split("/").flatMap((p, i) => (i === 0 ? [p] : ["groups", p]))];
}

/**
 * Which groups each locator belongs to: a locator is a member of a group when at least one of its
 * holders sits in the group or below it (plan places). Holders the plan does not know belong to
 * no group. Returns, per group path, its member locators in address order. Made once per run.
 */
export function membersByGroup(ctx: RuleContext): ReadonlyMap<string, readonly LocatorGroup[]> {
  const plan = ctx.input.plan!;
  const locs = locatorGroups(ctx);
  return ctx.shared("members-by-group", () => {
    // the groups of each node: its place and every place above it
    const groupsOf = new Map<string, string[]>();
    for (const n of plan.nodes) {
      const parts = n.place.split("/");
      groupsOf.set(n.name, n.place ? parts.map((_, i) => parts.slice(0, i + 1).join("/")) : []);
    }
    const out = new Map<string, LocatorGroup[]>();
    for (const g of plan.groups) out.set(g.path, []);
    for (const l of locs) {
      const first = l.nodes.length === 1 ? groupsOf.get(l.nodes[0]!) : undefined;
      const groups = first ?? new Set(l.nodes.flatMap((n) => groupsOf.get(n) ?? []));
      for (const g of groups) out.get(g)?.push(l);
    }
    return out;
  });
}

/**
 * The locator groups inside `p` that are not in `own`: how many, and the first `sample` of them in
 * address order. `sorted` is in address order (first address, then shorter first); `ownList` lists
 * `own`. Two binary searches count what lies inside, so the cost is the group's own size plus the
 * sample, not the size of `p` (a summary that wrongly covers a whole block stays cheap).
 */
export function foreignInside(sorted: readonly LocatorGroup[], p: WordRange, own: ReadonlySet<LocatorGroup>, ownList: readonly LocatorGroup[], sample = 5): { count: number; sample: LocatorGroup[] } {
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
  let lo = lowerBound((l) => compareFirst(l.range, p) < 0);
  // Prefixes starting at p's first address but shorter contain p rather than lie in it.
  while (lo < sorted.length && compareFirst(sorted[lo]!.range, p) === 0 && sorted[lo]!.range.len < p.len) lo++;
  const hi = lowerBound((l) => !endsBefore(p, l.range)); // l starts at or before p's last address
  const ownInside = ownList.filter((l) => isSubnetRange(l.range, p)).length;
  const out: LocatorGroup[] = [];
  for (let i = lo; i < hi && out.length < sample; i++) if (!own.has(sorted[i]!)) out.push(sorted[i]!);
  return { count: Math.max(0, hi - lo - ownInside), sample: out };
}
