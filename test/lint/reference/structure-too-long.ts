// Reference copy (object views) of src/lint/rules/structure-too-long.ts as it was before the port to the packed table.
/** A SID structure (block + node + function + argument) fits the 128 bits of an IPv6 address. */
import { formatAddr } from "../../../src/net/text.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";

export const structureTooLong: Rule = {
  meta: {
    id: "structure-too-long",
    severity: "error",
    summary: "Keep block + node + function + argument within 128 bits.",
    rationale:
      "A SID is one IPv6 address: block, node, function and argument are carved from its 128 bits. A structure that adds up to more cannot describe any SID, and an IGP receiver ignores the SID whose SID Structure says so.",
    source: "RFC 8986 §3.1; RFC 9352 §9; RFC 9513 §10; RFC 9252 §3.2.1",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    if (!ctx.input.fromTable && plan) {
      // A plan's SIDs are carved from its block layouts, so judge the layouts (one finding per block).
      for (const b of plan.blocks) {
        const L = b.layout;
        // Under NEXT-CSID, End.DT2M has no compressed codepoint and takes the block's argument bits
        // after node and function; REPLACE-CSID SIDs advertise the rest of the address as argument.
        const argumentBits = L.kind === "classic" || L.flavor === "NEXT-CSID" ? L.argumentBits : 0;
        const total = L.blockBits + L.nodeBits + L.functionBits + argumentBits;
        if (total <= 128) continue; // RFC 8986 §3.1: L + F + A <= 128
        ctx.report({
          message: `block ${b.name} (${b.prefix.format()}) lays SIDs out as block ${L.blockBits} + node ${L.nodeBits} + function ${L.functionBits} + argument ${argumentBits} = ${total} bits; at most 128 fit an IPv6 address`,
          location: ctx.locatePlan(["blocks", b.index, L.kind === "classic" ? "structure" : "compression"]),
          objects: [b.name, b.prefix.format()],
          hint: "shorten the block prefix, the node or function field, or the argument so the sum is 128 or less",
          data: { block: b.name, blockBits: L.blockBits, nodeBits: L.nodeBits, functionBits: L.functionBits, argumentBits, total },
        });
      }
      return;
    }
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
