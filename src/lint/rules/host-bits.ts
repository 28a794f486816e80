/** Locators (and a plan's block prefixes) have no bits set after their prefix length. */
import type { SourceLocation } from "../../plan/diagnostic.js";
import { SidGroups, nodeKeyOf, prefixClean } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const hostBits: Rule = {
  meta: {
    id: "host-bits",
    severity: "error",
    summary: "Write locators and blocks with every bit after the prefix length cleared.",
    rationale:
      "A prefix such as 5f00:0:100:1::1/64 is not the prefix its text shows: the address left of the slash must expand to the intended prefix. Tools that mask it silently and tools that refuse it disagree, so the locator advertised and the locator planned may differ.",
    source: "RFC 4291 §2.3; RFC 9352 §7.1 (locator bits past Loc-Size are zero)",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    if (!ctx.input.fromTable && plan) {
      // Normally refused when the plan is loaded; kept so a plan built another way is still checked.
      for (const b of plan.blocks) {
        if (!b.prefix.hasHostBits) continue; // RFC 4291 §2.3
        ctx.report({
          message: `block ${b.name} prefix ${b.prefix.format()} has bits set after /${b.prefix.len}`,
          location: ctx.locatePlan(["blocks", b.index, "prefix"]),
          objects: [b.name, b.prefix.format()],
          hint: `write ${b.prefix.masked().format()}`,
          data: { block: b.name, prefix: b.prefix.format(), masked: b.prefix.masked().format() },
        });
      }
    }
    const t = ctx.packed.table;
    // judged once per prefix: RFC 4291 §2.3
    const dirty = Uint8Array.from(t.prefixes, (_, p) => (prefixClean(t, p) ? 0 : 1));
    if (!dirty.includes(1)) return;
    const nodes = t.nodeNames.length;
    // The first SID row (lowest) naming each locator with host bits, for the location.
    const rowOf = new SidGroups(t);
    for (let i = 0; i < t.count; i++) {
      const loc = t.locator[i]!;
      if (loc < 0) continue;
      const p = t.locPrefix[loc]!;
      if (dirty[p] === 1) rowOf.add(p * nodes + nodeKeyOf(t, i), i, undefined);
    }
    const rank = t.nodeRank;
    const seen = new Set<number>();
    const judge = (nodeId: number, p: number) => {
      if (dirty[p] === 0) return; // RFC 4291 §2.3
      const k = p * nodes + rank[nodeId]!;
      if (seen.has(k)) return;
      seen.add(k);
      const node = t.nodeNames[nodeId]!;
      const prefix = t.prefixes[p]!;
      const text = prefix.format();
      const first = rowOf.get(k)?.first;
      const location: SourceLocation = first !== undefined && t.row[first]! > 0 ? { ...ctx.locateSidAt(first), field: "locator" } : ctx.locateNode(node);
      ctx.report({
        message: `locator ${text} of ${node} has bits set after /${prefix.len}`,
        location,
        objects: [node, text],
        hint: `write ${prefix.masked().format()}, or correct the length if the bits are meant`,
        data: { node, locator: text, masked: prefix.masked().format() },
      });
    };
    for (const id of ctx.packed.locatorOrder) judge(t.locNode[id]!, t.locPrefix[id]!);
    // A JSON table may name a SID's locator without listing it among the node's locators.
    for (const g of rowOf.ordered()) judge(t.node[g.lead]!, t.locPrefix[t.locator[g.lead]!]!);
  },
};
