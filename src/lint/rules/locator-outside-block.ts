/** Every locator lies inside a declared SID block. */
import type { Rule } from "../types.js";
import { locatorGroups, locatorLocator } from "../shared/locators.js";
import { PrefixIndex } from "../shared/prefixes.js";

export const locatorOutsideBlock: Rule = {
  meta: {
    id: "locator-outside-block",
    severity: "error",
    summary: "Carve every locator out of a declared SID block.",
    rationale:
      "A locator is the block followed by the node bits (B:N). A locator outside every declared block escapes the filters that keep SRv6 traffic inside the domain, since the edge drops only packets to the SID block, and it cannot be summarised with the rest of the plan.",
    source: "RFC 8986 §3.1 (locator = B:N); RFC 8754 §5.1 (one SID block filtered at the edge)",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    const where = locatorLocator(ctx);
    const names = plan.blocks.map((b) => `${b.name} ${b.prefix.format()}`).join(", ");
    // One finding per locator prefix: anycast members share one locator and one cause.
    for (const g of locatorGroups(ctx)) {
      // RFC 8986 §3.1: the locator is B:N, so it must sit inside a block B.
      if (blocks.containingRange(g.range)) continue;
      const loc = g.prefix.format();
      const nodes = g.nodes;
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
