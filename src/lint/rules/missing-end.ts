/** Every node has an End SID of its own for each algorithm it takes part in. */
import type { Rule } from "../types.js";
import { behaviorTest } from "../shared/behavior.js";
import { locatorGroups } from "../shared/locators.js";
import { PrefixIndex } from "../shared/prefixes.js";

export const missingEnd: Rule = {
  meta: {
    id: "missing-end",
    severity: "error",
    summary: "Give every node an End SID of its own for each of its algorithms.",
    rationale:
      "The End SID is how a segment list names a node; without one for an algorithm, no policy or repair path can steer traffic through the node in that topology, and Flex-Algo repair (LFA) needs one per node and algorithm. An End SID under a shared anycast locator names the group, not the node.",
    source: "RFC 9350 §14.2; RFC 9513 §8 (every SRv6 router SHOULD advertise at least one End SID)",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const planNode = new Map(plan?.nodes.map((n) => [n.name, n]) ?? []);
    // Locators several nodes hold (anycast): End SIDs under them do not name one node.
    const shared = new PrefixIndex(
      locatorGroups(ctx)
        .filter((g) => g.holders.length > 1 || g.anycast !== "")
        .map((g) => ({ prefix: g.prefix, value: g, range: g.range })),
    );
    const t = ctx.packed.table;
    const algos = new Map<string, Set<number>>();
    const have = new Map<string, Set<number>>();
    const add = (m: Map<string, Set<number>>, node: string, a: number) => {
      const set = m.get(node) ?? new Set<number>();
      set.add(a);
      m.set(node, set);
    };
    for (const node of t.nodeNames) for (const a of planNode.get(node)?.algorithms ?? []) add(algos, node, a);
    for (let id = 0; id < t.locatorCount; id++) if (!t.unlisted.has(id)) add(algos, t.nodeNames[t.locNode[id]!]!, t.locAlgorithm[id]!);
    // Per SID: its node runs its algorithm, and an End SID of its own counts. Most SIDs repeat the
    // node and algorithm of the SID before them, so the maps are only touched when those change.
    const isEnd = behaviorTest(t, "End");
    const nodeOf = t.node;
    const algOf = t.algorithm;
    let lastNode = -1;
    let lastAlg = 0;
    let lastEndNode = -1;
    let lastEndAlg = 0;
    for (let i = 0, n = t.count; i < n; i++) {
      const node = nodeOf[i]!;
      const a = algOf[i]!;
      if (node !== lastNode || a !== lastAlg) {
        add(algos, t.nodeNames[node]!, a);
        lastNode = node;
        lastAlg = a;
      }
      if ((node !== lastEndNode || a !== lastEndAlg) && isEnd(i) && !shared.containingSid(t, i)) {
        add(have, t.nodeNames[node]!, a);
        lastEndNode = node;
        lastEndAlg = a;
      }
    }
    for (const [node, set] of [...algos.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      for (const a of [...set].sort((x, y) => x - y)) {
        if (have.get(node)?.has(a)) continue;
        // RFC 9513 §8: every SRv6 router SHOULD advertise at least one End SID; RFC 9350 §14.2: per Flex-Algo.
        ctx.report({
          message: `node ${node} has no End SID of its own for algorithm ${a}`,
          location: ctx.locateNode(node),
          objects: [node],
          hint: `add an End SID (any flavour) under ${node}'s algorithm ${a} locator`,
          data: { node, algorithm: a },
        });
      }
    }
  },
};
