/** Block, locator and function boundaries fall on multiples of 4 bits (one hex digit). */
import { SidGroups, nodeKeyOf, structureKeyIds } from "../shared/sids.js";
import type { Rule } from "../types.js";

/** The boundaries (bit offsets) that are not multiples of 4, as "block 45, locator 61". */
function offNibble(blockBits: number, nodeBits: number, functionBits: number): string[] {
  const out: string[] = [];
  // common practice; RFC 3596 §2.5: ip6.arpa labels are one hex digit (4 bits) each.
  if (blockBits % 4 !== 0) out.push(`block ${blockBits}`);
  if ((blockBits + nodeBits) % 4 !== 0 && nodeBits > 0) out.push(`locator ${blockBits + nodeBits}`);
  if ((blockBits + nodeBits + functionBits) % 4 !== 0 && functionBits > 0) out.push(`function ${blockBits + nodeBits + functionBits}`);
  return out;
}

export const nibbleBoundary: Rule = {
  meta: {
    id: "nibble-boundary",
    severity: "info",
    summary: "Put block, locator and function boundaries on 4-bit (hex digit) boundaries.",
    rationale:
      "A boundary inside a hex digit makes SIDs hard to read and compare by eye (the node and function share a digit), and reverse DNS delegations in ip6.arpa, which go one hex digit at a time, cannot follow it.",
    source: "common practice; RFC 3596 §2.5",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    if (!ctx.input.fromTable && plan) {
      for (const b of plan.blocks) {
        const L = b.layout;
        const off = offNibble(L.blockBits, L.nodeBits, L.functionBits);
        if (off.length === 0) continue;
        ctx.report({
          message: `block ${b.name} (${b.prefix.format()}) has boundaries inside a hex digit: ${off.join(", ")} bits`,
          location: ctx.locatePlan(off[0]!.startsWith("block") ? ["blocks", b.index, "prefix"] : ["blocks", b.index, L.kind === "classic" ? "structure" : "compression"]),
          objects: [b.name, b.prefix.format()],
          hint: "choose block, node and function lengths that are multiples of 4 bits",
          data: { block: b.name, boundaries: off.join(", "), blockBits: L.blockBits, nodeBits: L.nodeBits, functionBits: L.functionBits },
        });
      }
      return;
    }
    // Table: one finding per distinct structure (a layout choice, not a per-SID fault).
    const t = ctx.packed.table;
    const ids = structureKeyIds(t, (st) => `${st.block}/${st.node}/${st.function}`);
    const offOf = t.structures.map((st) => offNibble(st.block, st.node, st.function));
    if (offOf.every((o) => o.length === 0)) return;
    const groups = new SidGroups<string[]>(t);
    const nodesOf: Set<number>[] = []; // per group key: its nodes
    for (let i = 0; i < t.count; i++) {
      const st = t.structure[i]!;
      if (st < 0) continue;
      const off = offOf[st]!;
      if (off.length === 0) continue;
      const k = ids[st]!;
      groups.add(k, i, off);
      (nodesOf[k] ??= new Set()).add(nodeKeyOf(t, i));
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const st = t.structures[t.structure[i]!]!;
      const sid = t.formatSid(i);
      const off = g.data;
      const nodes = nodesOf[ids[t.structure[i]!]!]!;
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} on ${nodes.size} node${nodes.size > 1 ? "s" : ""} (e.g. ${sid} of ${node}) have boundaries inside a hex digit: ${off.join(", ")} bits`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint: "choose block, node and function lengths that are multiples of 4 bits",
        data: { node, sid, boundaries: off.join(", "), blockBits: st.block, nodeBits: st.node, functionBits: st.function, count: g.count, nodes: nodes.size },
      });
    }
  },
};
