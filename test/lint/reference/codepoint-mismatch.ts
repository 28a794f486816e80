// Reference copy (object views) of src/lint/rules/codepoint-mismatch.ts as it was before the port to the packed table.
/** A row's codepoint is the one the IANA registry gives its behaviour and flavours. */
import { formatAddr } from "../../../src/net/text.js";
import { type Flavor, classifyCodepoint, codepointOf, isBehaviorName, parseFlavor } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const codepointMismatch: Rule = {
  meta: RULES["codepoint-mismatch"].meta,
  check(ctx) {
    const groups = new Map<string, { first: OwnedSid; count: number; expected: number; means: string }>();
    for (const s of ctx.sids) {
      const e = s.entry;
      if (e.codepoint === undefined || !isBehaviorName(e.behavior)) continue;
      const flavors: Flavor[] = [];
      let readable = true;
      for (const f of e.flavors) {
        const p = parseFlavor(f);
        if (p) flavors.push(p);
        else readable = false;
      }
      if (!readable) continue; // flavor-illegal reports the unknown name
      const expected = codepointOf(e.behavior, flavors);
      if (expected === undefined || expected === e.codepoint) continue; // IANA SRv6 Endpoint Behaviors registry
      // Reserved, unassigned, private-use and opaque values have rules of their own.
      const c = classifyCodepoint(e.codepoint);
      let means: string;
      if (c.kind === "behavior") means = c.flavors.length ? `${c.behavior} with ${c.flavors.join("+")}` : c.behavior;
      else if (c.kind === "other-registered") means = c.name;
      else continue;
      const key = `${s.node}|${e.behavior}|${flavors.join("+")}|${e.codepoint}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, expected, means });
      else {
        g.count++;
        if (e.row !== undefined && g.first.entry.row !== undefined && e.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const sid = formatAddr(e.sid);
      const what = e.flavors.length ? `${e.behavior} with ${e.flavors.join("+")}` : e.behavior;
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}) are ${what} but carry codepoint ${e.codepoint}, which the registry gives to ${g.means}; ${what} is ${g.expected}`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: `advertise codepoint ${g.expected}, or correct the behaviour and flavours if the codepoint is the intended one`,
        data: { node: g.first.node, sid, behavior: e.behavior, flavors: e.flavors.join("+"), codepoint: e.codepoint!, expected: g.expected, means: g.means, count: g.count },
      });
    }
  },
};
