// Reference copy (object views) of src/lint/rules/codepoint-private.ts as it was before the port to the packed table.
/** Private-use codepoints, and the opaque codepoint outside BGP services, deserve a second look. */
import { formatAddr } from "../../../src/net/text.js";
import { BEHAVIORS, classifyCodepoint, isBehaviorName } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

/** Behaviours BGP advertises as services (RFC 8986 §8.4 Table 3): the only place the opaque codepoint is meant for. */
const BGP_SERVICE_BINDINGS: ReadonlySet<string> = new Set(["vrf", "attachment-circuit", "bridge-domain"]);

export const codepointPrivate: Rule = {
  meta: RULES["codepoint-private"].meta,
  check(ctx) {
    const groups = new Map<string, { first: OwnedSid; count: number; kind: "private-use" | "opaque-outside-bgp" }>();
    for (const s of ctx.sids) {
      const e = s.entry;
      if (e.codepoint === undefined) continue;
      const c = classifyCodepoint(e.codepoint);
      let kind: "private-use" | "opaque-outside-bgp";
      if (c.kind === "private-use") kind = "private-use"; // RFC 8986 §10.2.1: 32768-34815
      else if (c.kind === "opaque" && isBehaviorName(e.behavior) && !BGP_SERVICE_BINDINGS.has(BEHAVIORS[e.behavior].binding)) kind = "opaque-outside-bgp"; // RFC 8986 §8.3
      else continue;
      const key = `${s.node}|${e.codepoint}|${kind === "opaque-outside-bgp" ? e.behavior : ""}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, kind });
      else {
        g.count++;
        if (e.row !== undefined && g.first.entry.row !== undefined && e.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const sid = formatAddr(e.sid);
      const n = `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}, ${e.behavior})`;
      ctx.report({
        message:
          g.kind === "private-use"
            ? `${n} carry the private-use codepoint ${e.codepoint}; it means nothing outside equipment configured alike`
            : `${n} carry the opaque codepoint 65535, but ${e.behavior} is not a BGP service SID`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint:
          g.kind === "private-use"
            ? "use the registered codepoint if the behaviour has one; otherwise make sure the value never leaves the domain that agreed on it"
            : "advertise the registered codepoint; keep 65535 for service SIDs (End.DX*, End.DT*) advertised in BGP",
        data: { node: g.first.node, sid, behavior: e.behavior, codepoint: e.codepoint!, kind: g.kind, count: g.count },
      });
    }
  },
};
