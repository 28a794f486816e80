/** Every SID's behaviour is a name from the IANA SRv6 Endpoint Behaviors registry. */
import { BEHAVIOR_NAMES, classifyCodepoint, isBehaviorName } from "../../sid/behaviors.js";
import { SidGroups, nodeKeyOf } from "../shared/sids.js";
import type { Rule } from "../types.js";

/**
 * Names printed by mistake in published texts, with the behaviour they mean:
 * RFC 8986 §8.4 Table 3 writes "End.B6.BM" for End.BM; RFC 9513 §11 writes "End.DT64" for codepoint 20
 * (End.DT46); draft-ietf-spring-srv6-srh-compression-04 writes "End.DX2U" for codepoint 123 (End.DT2U).
 */
export const MISPRINTS: ReadonlyMap<string, { name: string; where: string }> = new Map([
  ["End.B6.BM", { name: "End.BM", where: "RFC 8986 §8.4 Table 3" }],
  ["End.DT64", { name: "End.DT46", where: "RFC 9513 §11" }],
  ["End.DX2U", { name: "End.DT2U", where: "draft-ietf-spring-srv6-srh-compression-04" }],
]);

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
  meta: {
    id: "behavior-unknown",
    severity: "error",
    summary: "Name every SID's behaviour as the IANA registry spells it.",
    rationale:
      "The behaviour decides what a SID does and which codepoint, flavours and argument it may have; an unknown name cannot be checked against any of that and usually hides a typo or a misprint copied from a published text.",
    source: "IANA SRv6 Endpoint Behaviors registry; RFC 8986 §4, §10.2.2",
    needs: "table",
  },
  check(ctx) {
    const other = registeredElsewhere();
    const t = ctx.packed.table;
    // per behaviour name, once: IANA SRv6 Endpoint Behaviors registry
    const unknown = Uint8Array.from(t.behaviors, (b) => (isBehaviorName(b) || other.has(b) ? 0 : 1));
    if (!unknown.includes(1)) return;
    const groups = new SidGroups(t);
    const nodes = t.nodeNames.length;
    for (let i = 0; i < t.count; i++) {
      const bid = t.behavior[i]!;
      if (unknown[bid] === 1) groups.add(bid * nodes + nodeKeyOf(t, i), i, undefined);
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const cp = t.codepoint[i]!;
      const codepoint = Number.isNaN(cp) ? undefined : cp;
      const sid = t.formatSid(i);
      const misprint = MISPRINTS.get(behavior);
      const byCase = BY_LOWER.get(behavior.trim().toLowerCase());
      const byCodepoint = codepoint !== undefined ? classifyCodepoint(codepoint) : undefined;
      const suggestion = misprint?.name ?? byCase ?? (byCodepoint?.kind === "behavior" ? byCodepoint.behavior : undefined);
      let hint: string;
      if (misprint) hint = `"${behavior}" is a misprint in ${misprint.where}; the registry name is "${misprint.name}"`;
      else if (byCase) hint = `write "${byCase}" (behaviour names are case-sensitive)`;
      else if (suggestion) hint = `codepoint ${codepoint} is "${suggestion}" in the registry; write that name`;
      else hint = `write one of ${BEHAVIOR_NAMES.join(", ")}`;
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (e.g. ${sid}) have the unknown behaviour ${JSON.stringify(behavior)}`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint,
        data: { node, sid, behavior, ...(suggestion ? { suggestion } : {}), count: g.count },
      });
    }
  },
};
