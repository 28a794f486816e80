/** Declared summaries of sibling groups must not overlap. */
import type { Group } from "../../plan/model.js";
import type { Rule } from "../types.js";
import { groupPlanPath } from "../shared/summary.js";

export const summaryOverlap: Rule = {
  meta: {
    id: "summary-overlap",
    severity: "error",
    summary: "Give sibling groups disjoint summaries.",
    rationale:
      "Two regions (or two sites of one region) that advertise overlapping summaries both claim the shared space: traffic for it goes to whichever border is closer, and a node numbered there is reachable from one side only.",
    source: "RFC 5375 §2.4; RFC 3531 (aggregation); common practice for region summaries",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const byParent = new Map<string, Group[]>();
    for (const g of plan.groups) {
      if (!g.summary) continue;
      const k = g.parent ?? "";
      const list = byParent.get(k) ?? [];
      list.push(g);
      byParent.set(k, list);
    }
    for (const [, list] of [...byParent.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      const sorted = [...list].sort((a, b) => {
        const pa = a.summary!.masked();
        const pb = b.summary!.masked();
        return pa.first < pb.first ? -1 : pa.first > pb.first ? 1 : pa.len - pb.len || a.order - b.order;
      });
      // Sweep with a stack of open summaries: prefixes nest or are disjoint, so each summary meets
      // exactly the earlier ones that contain it.
      const open: Group[] = [];
      for (const g of sorted) {
        const p = g.summary!.masked();
        while (open.length > 0 && open[open.length - 1]!.summary!.masked().last < p.first) open.pop();
        for (const o of open) {
          const a = o.summary!.masked().format();
          const b = p.format();
          ctx.report({
            message: a === b ? `sibling groups ${o.path} and ${g.path} declare the same summary ${a}` : `summary ${b} of group ${g.path} lies inside summary ${a} of its sibling ${o.path}`,
            location: ctx.locatePlan([...groupPlanPath(g.path), "summary"]),
            objects: [o.path, g.path, a, b],
            hint: "give each sibling its own part of the parent's space",
            data: { group: g.path, other: o.path, summary: b, otherSummary: a },
          });
        }
        open.push(g);
      }
    }
  },
};
