/**
 * A group whose locators cannot be summarised without covering foreign space: the smallest prefix
 * holding all its members also holds other nodes' locators.
 */
import type { Rule } from "../types.js";
import { type LocatorGroup, locatorGroups, locatorLocator } from "../shared/locators.js";
import { PrefixIndex, coveringRange, rangePrefix } from "../shared/prefixes.js";
import { foreignInside, groupPlanPath, membersByGroup } from "../shared/summary.js";

export const summaryUnclean: Rule = {
  meta: {
    id: "summary-unclean",
    severity: "warning",
    summary: "Number each group's nodes so that one prefix covers them and nothing else.",
    rationale:
      "A region or site summarises its locators with one prefix only if no other node's locator sits among them. Otherwise the smallest covering prefix swallows foreign locators, and the group can only be advertised piecemeal, which defeats aggregation.",
    source: "RFC 5375 §2.4; RFC 3531 (aggregation); common practice for region summaries",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    if (!plan) return; // groups come from the plan; a bare table has none
    const locs = locatorGroups(ctx); // address order
    const members = membersByGroup(ctx);
    const where = locatorLocator(ctx);
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    for (const g of plan.groups) {
      const mine = members.get(g.path) ?? [];
      if (mine.length === 0) continue;
      const own = new Set(mine);
      // One summary per block and algorithm: locators of different blocks never share one.
      const parts = new Map<string, { block: string; algorithm: number; list: LocatorGroup[] }>();
      for (const l of mine) {
        const b = blocks.containingRange(l.range)?.value.name ?? "";
        const k = `${b}|${l.algorithm}`;
        const part = parts.get(k) ?? { block: b, algorithm: l.algorithm, list: [] };
        part.list.push(l);
        parts.set(k, part);
      }
      for (const part of [...parts.values()].sort((a, b) => (a.block < b.block ? -1 : a.block > b.block ? 1 : a.algorithm - b.algorithm))) {
        const cover = coveringRange(part.list.map((l) => l.range))!;
        const swallowed = foreignInside(locs, cover, own, mine, 3);
        if (swallowed.count === 0) continue;
        const who = [...new Set(swallowed.sample.flatMap((l) => l.nodes))];
        const text = rangePrefix(cover).format();
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
