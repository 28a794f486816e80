// Reference copy (object views) of src/lint/rules/behavior-unknown.ts as it was before the port to the packed table.
/** Every SID's behaviour is a name from the IANA SRv6 Endpoint Behaviors registry. */
import { formatAddr } from "../../../src/net/text.js";
import { BEHAVIOR_NAMES, classifyCodepoint, isBehaviorName } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";
import { MISPRINTS } from "../../../src/lint/rules/behavior-unknown.js";

// MISPRINTS is the rule's own (unchanged in the port)

let otherNames: ReadonlySet<string> | undefined;
/**
 * Behaviours the registry lists that sidcarve does not plan (End.MAP, End.LBS, End.Replicate...):
 * known names, so not reported here. Read from the codepoint table once.
 */
function registeredElsewhere(): ReadonlySet<string> {
  if (otherNames) return otherNames;
  const out = new Set<string>();
  for (let cp = 1; cp < 0x8000; cp++) {
    const c = classifyCodepoint(cp);
    if (c.kind === "other-registered" && c.name.startsWith("End")) out.add(c.name.replace(/ with .*$/, ""));
  }
  otherNames = out;
  return out;
}

const BY_LOWER: ReadonlyMap<string, string> = new Map(BEHAVIOR_NAMES.map((n) => [n.toLowerCase(), n]));

export const behaviorUnknown: Rule = {
  meta: RULES["behavior-unknown"].meta,
  check(ctx) {
    const other = registeredElsewhere();
    const groups = new Map<string, { first: OwnedSid; count: number }>();
    for (const s of ctx.sids) {
      const b = s.entry.behavior;
      if (isBehaviorName(b) || other.has(b)) continue; // IANA SRv6 Endpoint Behaviors registry
      const key = `${s.node}|${b}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1 });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const sid = formatAddr(e.sid);
      const misprint = MISPRINTS.get(e.behavior);
      const byCase = BY_LOWER.get(e.behavior.trim().toLowerCase());
      const byCodepoint = e.codepoint !== undefined ? classifyCodepoint(e.codepoint) : undefined;
      const suggestion = misprint?.name ?? byCase ?? (byCodepoint?.kind === "behavior" ? byCodepoint.behavior : undefined);
      let hint: string;
      if (misprint) hint = `"${e.behavior}" is a misprint in ${misprint.where}; the registry name is "${misprint.name}"`;
      else if (byCase) hint = `write "${byCase}" (behaviour names are case-sensitive)`;
      else if (suggestion) hint = `codepoint ${e.codepoint} is "${suggestion}" in the registry; write that name`;
      else hint = `write one of ${BEHAVIOR_NAMES.join(", ")}`;
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}) have the unknown behaviour ${JSON.stringify(e.behavior)}`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint,
        data: { node: g.first.node, sid, behavior: e.behavior, ...(suggestion ? { suggestion } : {}), count: g.count },
      });
    }
  },
};
