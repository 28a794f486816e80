// Reference copy (object views) of src/lint/rules/csid-block-length.ts as it was before the port to the packed table.
/** Compressed blocks use the Locator-Block lengths RFC 9800 asks implementations to support or recommends. */
import { Prefix } from "../../../src/net/prefix.js";
import { formatAddr } from "../../../src/net/text.js";
import { prefixMask } from "../../../src/net/uint128.js";
import type { SourceLocation } from "../../../src/plan/diagnostic.js";
import type { OwnedSid, Rule, RuleContext } from "../../../src/lint/types.js";
import { type CsidFlavor, replace16Locators, shapeOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";
import { judge, say } from "../../../src/lint/rules/csid-block-length.js";

// judge and say (the judgement and the wording) did not change in the port: they are the rule's own

export const csidBlockLength: Rule = {
  meta: RULES["csid-block-length"].meta,
  check(ctx: RuleContext) {
    const plan = ctx.input.plan;
    // A plan's block layouts: this branch did not change in the port, so it is the real rule's.
    if (!ctx.input.fromTable && plan) return RULES["csid-block-length"].check(ctx);
    // Table: one finding per Locator-Block prefix, flavour and C-SID length.
    const r16 = replace16Locators(ctx.sids);
    const groups = new Map<string, { first: OwnedSid; count: number; prefix: Prefix; flavor: CsidFlavor; csidBits: number }>();
    for (const s of ctx.sids) {
      const v = shapeOf(s, r16);
      if (!v || v.st.block === 0) continue;
      const first = s.entry.sid & prefixMask(v.st.block);
      const key = `${v.st.block}:${first}|${v.flavor}|${v.shape.length}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, prefix: new Prefix(first, v.st.block), flavor: v.flavor, csidBits: v.shape.length });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const j = judge(g.flavor, g.prefix.len, g.csidBits);
      if (!j) continue;
      const block = g.prefix.format();
      const sid = formatAddr(g.first.entry.sid);
      const { message, hint } = say(`Locator-Block ${block} (${g.count} SID${g.count > 1 ? "s" : ""}, e.g. ${sid})`, g.flavor, g.prefix.len, g.csidBits, j);
      const location: SourceLocation = ctx.locateSid(g.first);
      ctx.report({
        message,
        location,
        objects: [block, g.first.node, sid],
        hint,
        data: { block, flavor: g.flavor, blockBits: g.prefix.len, csidBits: g.csidBits, kind: j.kind, ...(j.limit !== undefined ? { limit: j.limit } : {}), sid, count: g.count },
      });
    }
  },
};
