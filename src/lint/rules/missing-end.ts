/** Every node has an End SID of its own for each algorithm it takes part in. */
import { classifyCodepoint } from "../../sid/behaviors.js";
import type { OwnedSid, Rule } from "../types.js";
import { PrefixIndex, locatorsByPrefix } from "./locator-outside-block.js";

/** True when the SID is an End SID, in any flavour: by name, or by its codepoint when the name is not ours. */
export function isBehavior(s: OwnedSid, name: string): boolean {
  if (s.entry.behavior === name) return true;
  const cp = s.entry.codepoint;
  if (cp === undefined || !Number.isInteger(cp) || cp < 0 || cp > 0xffff) return false;
  const c = classifyCodepoint(cp);
  return c.kind === "behavior" && c.behavior === name;
}

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
      locatorsByPrefix(ctx)
        .filter((g) => g.holders.length > 1 || g.holders.some((h) => h.entry.anycast !== ""))
        .map((g) => ({ prefix: g.prefix, value: g })),
    );
    const algos = new Map<string, Set<number>>();
    const have = new Map<string, Set<number>>();
    const add = (m: Map<string, Set<number>>, node: string, a: number) => {
      const set = m.get(node) ?? new Set<number>();
      set.add(a);
      m.set(node, set);
    };
    for (const n of ctx.input.table.nodes) {
      for (const a of planNode.get(n.node)?.algorithms ?? []) add(algos, n.node, a);
      for (const l of n.locators) add(algos, n.node, l.algorithm);
    }
    for (const s of ctx.sids) {
      add(algos, s.node, s.entry.algorithm);
      if (isBehavior(s, "End") && !shared.containingAddr(s.entry.sid)) add(have, s.node, s.entry.algorithm);
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
