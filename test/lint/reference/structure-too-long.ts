// Reference copy (object views) of src/lint/rules/structure-too-long.ts as it was before the port to the packed table.
/** A SID structure (block + node + function + argument) fits the 128 bits of an IPv6 address. */
import { formatAddr } from "../../../src/net/text.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const structureTooLong: Rule = {
  meta: RULES["structure-too-long"].meta,
  check(ctx) {
    // A plan's block layouts: this branch did not change in the port, so it is the real rule's.
    if (!ctx.input.fromTable && ctx.input.plan) return RULES["structure-too-long"].check(ctx);
    // Table: one finding per node and structure, not per SID.
    const groups = new Map<string, { first: OwnedSid; count: number }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      if (!st) continue;
      if (st.block + st.node + st.function + st.argument <= 128) continue; // RFC 8986 §3.1; RFC 9352 §9
      const key = `${s.node}|${st.block}/${st.node}/${st.function}/${st.argument}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1 });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const st = g.first.entry.structure!;
      const total = st.block + st.node + st.function + st.argument;
      const sid = formatAddr(g.first.entry.sid);
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}) have the structure block ${st.block} + node ${st.node} + function ${st.function} + argument ${st.argument} = ${total} bits; at most 128 are allowed`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: "correct the structure lengths: together they must fit the 128 bits of the SID",
        data: { node: g.first.node, sid, blockBits: st.block, nodeBits: st.node, functionBits: st.function, argumentBits: st.argument, total, count: g.count },
      });
    }
  },
};
