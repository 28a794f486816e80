// Reference copy (object views) of src/lint/rules/locator-length.ts as it was before the port to the packed table.
/** A SID's locator is as long as the block and node bits of its structure. */
import { formatAddr } from "../../../src/net/text.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const locatorLength: Rule = {
  meta: RULES["locator-length"].meta,
  check(ctx) {
    // One finding per node, locator and stated block + node length.
    const groups = new Map<string, { first: OwnedSid; count: number }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      const loc = s.entry.locator;
      if (!st || !loc) continue;
      if (loc.len === st.block + st.node) continue; // RFC 8986 §3.1: L = LB + LN
      const key = `${s.node}|${loc.format()}|${st.block}/${st.node}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1 });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const st = g.first.entry.structure!;
      const loc = g.first.entry.locator!.format();
      const sid = formatAddr(g.first.entry.sid);
      const expected = st.block + st.node;
      ctx.report({
        message: `locator ${loc} of ${g.first.node} is /${g.first.entry.locator!.len}, but ${g.count} of its SID${g.count > 1 ? "s" : ""} (e.g. ${sid}) state block ${st.block} + node ${st.node} = ${expected} bits`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, loc],
        hint: `advertise the locator as /${expected}, or correct the block and node lengths of the SID structure`,
        data: { node: g.first.node, locator: loc, locatorLength: g.first.entry.locator!.len, blockBits: st.block, nodeBits: st.node, expected, sid, count: g.count },
      });
    }
  },
};
