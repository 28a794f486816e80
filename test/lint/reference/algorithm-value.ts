// Reference copy (object views) of src/lint/rules/algorithm-value.ts as it was before the port to the packed table.
/** Algorithms are 0 (SPF), 1 (strict SPF) or a Flexible Algorithm 128-255; 2-127 are unassigned. */
import type { Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

/** IANA IGP Algorithm Types: 0 and 1 assigned, 2-127 unassigned, 128-255 Flexible Algorithms (RFC 9350 §4). */
const isUnassigned = (a: number) => a >= 2 && a <= 127;

export const algorithmValue: Rule = {
  meta: RULES["algorithm-value"].meta,
  check(ctx) {
    const plan = ctx.input.plan;
    // A plan's block layouts: this branch did not change in the port, so it is the real rule's.
    if (!ctx.input.fromTable && plan) return RULES["algorithm-value"].check(ctx);
    // Table: one finding per node and algorithm, located at the node's first row with it.
    const groups = new Map<string, { node: string; algorithm: number; sids: number; locators: number; row: number | undefined }>();
    const get = (node: string, algorithm: number) => {
      const key = `${node}|${algorithm}`;
      let g = groups.get(key);
      if (!g) groups.set(key, (g = { node, algorithm, sids: 0, locators: 0, row: undefined }));
      return g;
    };
    for (const l of ctx.locators) if (isUnassigned(l.entry.algorithm)) get(l.node, l.entry.algorithm).locators++;
    for (const s of ctx.sids) {
      if (!isUnassigned(s.entry.algorithm)) continue; // IANA IGP Algorithm Types
      const g = get(s.node, s.entry.algorithm);
      g.sids++;
      if (s.entry.row !== undefined && (g.row === undefined || s.entry.row < g.row)) g.row = s.entry.row;
    }
    for (const g of groups.values()) {
      ctx.report({
        message: `${g.node} uses the unassigned algorithm ${g.algorithm} (${g.locators} locator${g.locators === 1 ? "" : "s"}, ${g.sids} SID${g.sids === 1 ? "" : "s"}); use 0 (SPF), 1 (strict SPF) or a Flex-Algo 128-255`,
        location: g.row !== undefined ? { file: ctx.input.file, row: g.row, field: "algorithm" } : ctx.locateNode(g.node),
        objects: [g.node, String(g.algorithm)],
        hint: "Flex-Algos are numbered 128-255",
        data: { node: g.node, algorithm: g.algorithm, sids: g.sids, locators: g.locators },
      });
    }
  },
};
