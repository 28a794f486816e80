// Reference copy (object views) of src/lint/rules/sid-duplicate.ts as it was before the port to the packed table.
/** A SID address belongs to exactly one binding on one node (anycast members excepted). */
import { formatAddr } from "../../../src/net/text.js";
import type { Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const sidDuplicate: Rule = {
  meta: RULES["sid-duplicate"].meta,
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
    const anycastLocators = new Map<string, typeof ctx.locators[number][]>();
    for (const l of ctx.locators) {
      if (l.entry.anycast === "") continue;
      const list = anycastLocators.get(l.node) ?? [];
      list.push(l);
      anycastLocators.set(l.node, list);
    }
    // ctx.sids is sorted by address, so equal addresses are neighbours: one pass.
    const s = ctx.sids;
    for (let i = 0; i < s.length; ) {
      let j = i + 1;
      while (j < s.length && s[j]!.entry.sid === s[i]!.entry.sid) j++;
      if (j - i > 1) {
        const group = s.slice(i, j);
        const addr = formatAddr(s[i]!.entry.sid);
        const byNode = new Map<string, number>();
        for (const g of group) byNode.set(g.node, (byNode.get(g.node) ?? 0) + 1);
        for (const [node, count] of byNode) {
          if (count > 1) {
            const rows = group.filter((g) => g.node === node);
            ctx.report({
              message: `SID ${addr} appears ${count} times on ${node} (${rows.map((r) => r.entry.behavior).join(", ")})`,
              location: ctx.locateSid(rows[1]!),
              objects: [node, addr],
              hint: "give each binding its own function value",
              data: { sid: addr, node, count },
            });
          }
        }
        const nodes = [...byNode.keys()];
        const anycastShared = group.every((g) => g.entry.locator && group.some((h) => h.node !== g.node)) && nodes.every((a) => nodes.every((b) => a === b || anycastPair(a, b)));
        const sharedLocatorAnycast = group.every((g) => (anycastLocators.get(g.node) ?? []).some((l) => l.entry.prefix.contains(g.entry.sid)));
        if (nodes.length > 1 && !anycastShared && !sharedLocatorAnycast) {
          ctx.report({
            message: `SID ${addr} is on ${nodes.length} nodes: ${nodes.join(", ")}`,
            location: ctx.locateSid(group.find((g) => g.node === nodes[1])!),
            objects: [...nodes, addr],
            hint: "each node's SIDs must come from its own locator; declare an anycast group if the nodes share the SID on purpose",
            data: { sid: addr, nodes: nodes.join(",") },
          });
        }
      }
      i = j;
    }
  },
};
