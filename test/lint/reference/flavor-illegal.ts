// Reference copy (object views) of src/lint/rules/flavor-illegal.ts as it was before the port to the packed table.
/** Flavours are known names, and legal for the behaviour they are given to. */
import { formatAddr } from "../../../src/net/text.js";
import { type Flavor, FLAVOR_ORDER, flavorProblem, isBehaviorName, normalizeFlavors, parseFlavor } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const flavorIllegal: Rule = {
  meta: RULES["flavor-illegal"].meta,
  check(ctx) {
    const groups = new Map<string, { first: OwnedSid; count: number; unknown: string[]; problem: string | undefined }>();
    for (const s of ctx.sids) {
      const e = s.entry;
      if (e.flavors.length === 0) continue;
      const parsed: Flavor[] = [];
      const unknown: string[] = [];
      for (const f of e.flavors) {
        const p = parseFlavor(f);
        if (p) parsed.push(p);
        else unknown.push(f);
      }
      let key: string;
      let problem: string | undefined;
      if (unknown.length > 0) {
        key = `${s.node}|unknown|${unknown.join("+")}`;
      } else {
        if (!isBehaviorName(e.behavior)) continue; // behavior-unknown reports the name
        problem = flavorProblem(e.behavior, parsed); // RFC 8986 §4.16; RFC 9800 §4; IANA registry
        if (problem === undefined) continue;
        key = `${s.node}|${e.behavior}|${normalizeFlavors(parsed).join("+")}`;
      }
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, unknown, problem });
      else {
        g.count++;
        if (e.row !== undefined && g.first.entry.row !== undefined && e.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const sid = formatAddr(e.sid);
      const flavors = e.flavors.join("+");
      const n = `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}, ${e.behavior} with ${flavors})`;
      ctx.report({
        message:
          g.unknown.length > 0
            ? `${n}: unknown flavour ${g.unknown.map((u) => JSON.stringify(u)).join(", ")}; known flavours: ${FLAVOR_ORDER.join(", ")}`
            : `${n}: ${g.problem}`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: g.unknown.length > 0 ? "write flavours as PSP, USP, USD, NEXT-CSID or REPLACE-CSID, joined with +" : "drop the flavours the behaviour does not have, or use a behaviour that has them",
        data: { node: g.first.node, sid, behavior: e.behavior, flavors, kind: g.unknown.length > 0 ? "unknown-flavor" : "illegal", ...(g.unknown.length > 0 ? { unknown: g.unknown.join("+") } : {}), count: g.count },
      });
    }
  },
};
