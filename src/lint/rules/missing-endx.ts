/** Every link has End.X SIDs on both ends, for each algorithm the link carries. */
import type { Rule } from "../types.js";
import { isBehavior } from "./missing-end.js";

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
