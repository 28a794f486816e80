// Reference copy (object views) of src/lint/rules/locator-overlap.ts as it was before the port to the packed table.
/** Locators of different nodes must not overlap, unless the nodes share a declared anycast group. */
import type { Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const locatorOverlap: Rule = {
  meta: RULES["locator-overlap"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    const groupsOf = new Map<string, Set<string>>();
    for (const n of plan?.nodes ?? []) groupsOf.set(n.name, new Set(n.anycast));
    const shareAnycast = (a: string, b: string, la: string, lb: string) => {
      if (la !== "" && la === lb) return true;
      const ga = groupsOf.get(a);
      const gb = groupsOf.get(b);
      if (!ga || !gb) return false;
      for (const g of ga) if (gb.has(g)) return true;
      return false;
    };
    // Sweep in address order: keep the locators whose range is still open (a stack of nested
    // prefixes), so each locator is compared only with the prefixes that contain it.
    const open: typeof ctx.locators[number][] = [];
    const seen = new Set<string>();
    for (const cur of ctx.locators) {
      const first = cur.entry.prefix.first;
      while (open.length > 0 && open[open.length - 1]!.entry.prefix.last < first) open.pop();
      for (const o of open) {
        if (o.node === cur.node) continue;
        if (shareAnycast(o.node, cur.node, o.entry.anycast, cur.entry.anycast)) continue;
        const a = o.entry.prefix.format();
        const b = cur.entry.prefix.format();
        const key = `${o.node}|${cur.node}|${a}|${b}`;
        if (seen.has(key)) continue;
        seen.add(key);
        ctx.report({
          message: a === b ? `nodes ${o.node} and ${cur.node} both own locator ${a}` : `locator ${b} of ${cur.node} lies inside locator ${a} of ${o.node}`,
          location: ctx.locateNode(cur.node),
          objects: [o.node, cur.node, a, b],
          hint: "give each node its own locator, or declare the nodes as members of one anycast group",
          data: { nodeA: o.node, nodeB: cur.node, locatorA: a, locatorB: b },
        });
      }
      open.push(cur);
    }
  },
};
