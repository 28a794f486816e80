// Reference copy (object views) of src/lint/rules/nibble-boundary.ts as it was before the port to the packed table.
/** Block, locator and function boundaries fall on multiples of 4 bits (one hex digit). */
import { formatAddr } from "../../../src/net/text.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

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
  meta: RULES["nibble-boundary"].meta,
  check(ctx) {
    // A plan's block layouts: this branch did not change in the port, so it is the real rule's.
    if (!ctx.input.fromTable && ctx.input.plan) return RULES["nibble-boundary"].check(ctx);
    // Table: one finding per distinct structure (a layout choice, not a per-SID fault).
    const offByStructure = new Map<string, string[]>();
    const groups = new Map<string, { first: OwnedSid; count: number; nodes: Set<string>; off: string[] }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      if (!st) continue;
      const key = `${st.block}/${st.node}/${st.function}`;
      let off = offByStructure.get(key);
      if (!off) offByStructure.set(key, (off = offNibble(st.block, st.node, st.function)));
      if (off.length === 0) continue;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, nodes: new Set([s.node]), off });
      else {
        g.count++;
        g.nodes.add(s.node);
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const st = g.first.entry.structure!;
      const sid = formatAddr(g.first.entry.sid);
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} on ${g.nodes.size} node${g.nodes.size > 1 ? "s" : ""} (e.g. ${sid} of ${g.first.node}) have boundaries inside a hex digit: ${g.off.join(", ")} bits`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: "choose block, node and function lengths that are multiples of 4 bits",
        data: { node: g.first.node, sid, boundaries: g.off.join(", "), blockBits: st.block, nodeBits: st.node, functionBits: st.function, count: g.count, nodes: g.nodes.size },
      });
    }
  },
};
