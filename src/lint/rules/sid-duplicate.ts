/** A SID address belongs to exactly one binding on one node (anycast members excepted). */
import type { PackedSidTable } from "../../sid/packed.js";
import { prefixHolds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const sidDuplicate: Rule = {
  meta: {
    id: "sid-duplicate",
    severity: "error",
    summary: "Use every SID once: not on two nodes, not twice on one node.",
    rationale:
      "A SID names one behaviour on one node. The same address on two nodes sends traffic to whichever is closer; twice on one node it binds two behaviours to one address and one of them is lost. Members of an anycast group share the SIDs under the anycast locator by design.",
    source: "RFC 8986 §3.1; RFC 9352 §6 (anycast)",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const groupsOf = new Map<string, Set<string>>();
    for (const n of plan?.nodes ?? []) groupsOf.set(n.name, new Set(n.anycast));
    const anycastPair = (a: string, b: string) => {
      const ga = groupsOf.get(a);
      const gb = groupsOf.get(b);
      if (!ga || !gb) return false;
      for (const g of ga) if (gb.has(g)) return true;
      return false;
    };
    const { table: t, sidOrder, locatorOrder } = ctx.packed;
    // each node's anycast locators (by node name), made when the first duplicate is seen
    let anycastLocators: Map<number, number[]> | undefined;
    const anycastOf = (i: number): number[] => {
      if (!anycastLocators) {
        anycastLocators = new Map();
        for (const id of locatorOrder) {
          if (t.locatorEntry(id).anycast === "") continue;
          const k = t.nodeRank[t.locNode[id]!]!;
          const list = anycastLocators.get(k);
          if (list) list.push(id);
          else anycastLocators.set(k, [id]);
        }
      }
      return anycastLocators.get(t.nodeRank[t.node[i]!]!) ?? [];
    };
    const runs = sameAddressRuns(t, sidOrder);
    for (let r = 0; r < runs.length; r += 2) report(Array.from(sidOrder.subarray(runs[r]!, runs[r + 1]!)));

    /** The findings on SIDs of one address (in ctx.sids order). */
    function report(group: number[]): void {
      const addr = t.formatSid(group[0]!);
      const byNode = new Map<string, number>();
      for (const g of group) byNode.set(t.nodeOf(g), (byNode.get(t.nodeOf(g)) ?? 0) + 1);
      for (const [node, count] of byNode) {
        if (count > 1) {
          const rows = group.filter((g) => t.nodeOf(g) === node);
          ctx.report({
            message: `SID ${addr} appears ${count} times on ${node} (${rows.map((r) => t.behaviors[t.behavior[r]!]).join(", ")})`,
            location: ctx.locateSidAt(rows[1]!),
            objects: [node, addr],
            hint: "give each binding its own function value",
            data: { sid: addr, node, count },
          });
        }
      }
      const nodes = [...byNode.keys()];
      const anycastShared = group.every((g) => t.locator[g]! >= 0 && group.some((h) => t.nodeOf(h) !== t.nodeOf(g))) && nodes.every((x) => nodes.every((y) => x === y || anycastPair(x, y)));
      const sharedLocatorAnycast = () => group.every((g) => anycastOf(g).some((l) => prefixHolds(t, t.locPrefix[l]!, g)));
      if (nodes.length > 1 && !anycastShared && !sharedLocatorAnycast()) {
        ctx.report({
          message: `SID ${addr} is on ${nodes.length} nodes: ${nodes.join(", ")}`,
          location: ctx.locateSidAt(group.find((g) => t.nodeOf(g) === nodes[1])!),
          objects: [...nodes, addr],
          hint: "each node's SIDs must come from its own locator; declare an anycast group if the nodes share the SID on purpose",
          data: { sid: addr, nodes: nodes.join(",") },
        });
      }
    }
  },
};

/**
 * The runs of two or more SIDs with one address in `order` (sorted by address, so equal addresses
 * are neighbours), as start and end positions: one pass on the words.
 */
function sameAddressRuns(t: PackedSidTable, order: Int32Array): number[] {
  const runs: number[] = [];
  const { w0, w1, w2, w3 } = t;
  const n = order.length;
  for (let k = 0; k < n; ) {
    const i = order[k]!;
    const a0 = w0[i]!;
    const a1 = w1[i]!;
    const a2 = w2[i]!;
    const a3 = w3[i]!;
    let j = k + 1;
    for (; j < n; j++) {
      const x = order[j]!;
      if (w3[x] !== a3 || w2[x] !== a2 || w1[x] !== a1 || w0[x] !== a0) break;
    }
    if (j - k > 1) runs.push(k, j);
    k = j;
  }
  return runs;
}
