// Reference copy (object views) of src/lint/rules/host-bits.ts as it was before the port to the packed table.
/** Locators (and a plan's block prefixes) have no bits set after their prefix length. */
import type { Prefix } from "../../../src/net/prefix.js";
import type { SourceLocation } from "../../../src/plan/diagnostic.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const hostBits: Rule = {
  meta: RULES["host-bits"].meta,
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
    // The first SID row (lowest) naming each locator with host bits, for the location.
    const rowOf = new Map<string, OwnedSid>();
    for (const s of ctx.sids) {
      if (!s.entry.locator?.hasHostBits) continue;
      const k = `${s.node}|${s.entry.locator.format()}`;
      const cur = rowOf.get(k);
      if (!cur || (s.entry.row !== undefined && cur.entry.row !== undefined && s.entry.row < cur.entry.row)) rowOf.set(k, s);
    }
    const seen = new Set<string>();
    const judge = (node: string, p: Prefix) => {
      if (!p.hasHostBits) return; // RFC 4291 §2.3
      const text = p.format();
      const k = `${node}|${text}`;
      if (seen.has(k)) return;
      seen.add(k);
      const s = rowOf.get(k);
      const location: SourceLocation = s && s.entry.row !== undefined ? { ...ctx.locateSid(s), field: "locator" } : ctx.locateNode(node);
      ctx.report({
        message: `locator ${text} of ${node} has bits set after /${p.len}`,
        location,
        objects: [node, text],
        hint: `write ${p.masked().format()}, or correct the length if the bits are meant`,
        data: { node, locator: text, masked: p.masked().format() },
      });
    };
    for (const l of ctx.locators) judge(l.node, l.entry.prefix);
    // A JSON table may name a SID's locator without listing it among the node's locators.
    for (const s of ctx.sids) if (s.entry.locator) judge(s.node, s.entry.locator);
  },
};
