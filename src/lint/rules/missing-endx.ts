/** Every link has End.X SIDs on both ends, for each algorithm the link carries. */
import type { Rule } from "../types.js";
import { behaviorTest } from "../shared/behavior.js";

export const missingEndx: Rule = {
  meta: {
    id: "missing-endx",
    severity: "warning",
    summary: "Give both ends of every link an End.X SID for each algorithm the link carries.",
    rationale:
      "End.X SIDs name adjacencies: explicit paths and repair paths (TI-LFA style) are built from them. A link end without one for an algorithm cannot be used by a repair path in that Flex-Algo, and policies cannot pin traffic to the link.",
    source: "RFC 9350 §14.2 (LFA for a Flex-Algo needs an End.X SID per link)",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const algosOf = new Map(plan.nodes.map((n) => [n.name, n.algorithms]));
    const t = ctx.packed.table;
    const inTable = new Set(t.nodeNames);
    // node -> algorithm -> neighbor -> interfaces named in the SIDs' context ("" when none is named)
    const endx = new Map<string, Map<number, Map<string, Set<string>>>>();
    const isEndX = behaviorTest(t, "End.X");
    for (let i = 0; i < t.count; i++) {
      if (!isEndX(i)) continue;
      const context = t.contextOf(t.context[i]!);
      const nb = context["neighbor"];
      if (nb === undefined) continue;
      const node = t.nodeOf(i);
      let byAlg = endx.get(node);
      if (!byAlg) endx.set(node, (byAlg = new Map()));
      let byNb = byAlg.get(t.algorithm[i]!);
      if (!byNb) byAlg.set(t.algorithm[i]!, (byNb = new Map()));
      let set = byNb.get(nb);
      if (!set) byNb.set(nb, (set = new Set()));
      set.add(context["interface"] ?? "");
    }
    for (const l of plan.links) {
      const [a, b] = l.ends;
      const algos = l.algorithms ?? (algosOf.get(a.node) ?? []).filter((x) => (algosOf.get(b.node) ?? []).includes(x));
      l.ends.forEach((me, j) => {
        // A node the inventory does not hold at all is not deployed yet: nothing to judge.
        if (ctx.input.fromTable && !inTable.has(me.node)) return;
        const peer = l.ends[1 - j]!;
        const missing = algos.filter((alg) => {
          const set = endx.get(me.node)?.get(alg)?.get(peer.node);
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
