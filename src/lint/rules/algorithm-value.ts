/** Algorithms are 0 (SPF), 1 (strict SPF) or a Flexible Algorithm 128-255; 2-127 are unassigned. */
import { compareSids } from "../shared/sids.js";
import type { Rule } from "../types.js";

/** IANA IGP Algorithm Types: 0 and 1 assigned, 2-127 unassigned, 128-255 Flexible Algorithms (RFC 9350 §4). */
const isUnassigned = (a: number) => a >= 2 && a <= 127;

export const algorithmValue: Rule = {
  meta: {
    id: "algorithm-value",
    severity: "error",
    summary: "Use algorithm 0, 1 or a Flex-Algo 128-255.",
    rationale:
      "Locators and SIDs are advertised per algorithm. Values 2-127 are unassigned in the IGP Algorithm Types registry: no router computes paths for them, so locators of such an algorithm are never installed and their SIDs are unreachable.",
    source: "RFC 9350 §4; IANA IGP Algorithm Types registry; RFC 9352 §7.1",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    if (!ctx.input.fromTable && plan) {
      // Blocks, nodes and services may only use declared algorithms, so the declarations say it all.
      plan.algorithms.forEach((a, i) => {
        if (!isUnassigned(a.id)) return; // IANA IGP Algorithm Types
        ctx.report({
          message: `algorithm ${a.id} (${a.name}) is unassigned; use 0 (SPF), 1 (strict SPF) or a Flex-Algo 128-255`,
          location: ctx.locatePlan(["algorithms", i, "id"]),
          objects: [a.name, String(a.id)],
          hint: "Flex-Algos are numbered 128-255",
          data: { algorithm: a.id, name: a.name },
        });
      });
      return;
    }
    // Table: one finding per node and algorithm, located at the node's first row with it.
    const t = ctx.packed.table;
    const rank = t.nodeRank;
    // lead: the group's first SID in ctx.sids order, or -1 when a locator made the group
    const groups = new Map<number, { node: string; algorithm: number; sids: number; locators: number; row: number | undefined; lead: number }>();
    const get = (nodeId: number, algorithm: number, lead: number) => {
      const key = (algorithm - 2) * rank.length + rank[nodeId]!;
      let g = groups.get(key);
      if (!g) groups.set(key, (g = { node: t.nodeNames[nodeId]!, algorithm, sids: 0, locators: 0, row: undefined, lead }));
      return g;
    };
    for (const id of ctx.packed.locatorOrder) {
      const a = t.locAlgorithm[id]!;
      if (isUnassigned(a)) get(t.locNode[id]!, a, -1).locators++;
    }
    const algorithms = t.algorithm;
    for (let i = 0; i < t.count; i++) {
      const a = algorithms[i]!;
      if (!isUnassigned(a)) continue; // IANA IGP Algorithm Types
      const g = get(t.node[i]!, a, i);
      g.sids++;
      if (g.lead >= 0 && compareSids(t, i, g.lead) < 0) g.lead = i;
      const row = t.row[i]!;
      if (row > 0 && (g.row === undefined || row < g.row)) g.row = row;
    }
    // groups in the order the object rule made them: the locators' first, then by first SID
    const ordered = [...groups.values()];
    const fromSids = ordered.filter((g) => g.lead >= 0).sort((x, y) => compareSids(t, x.lead, y.lead));
    const list = [...ordered.filter((g) => g.lead < 0), ...fromSids];
    for (const g of list) {
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
