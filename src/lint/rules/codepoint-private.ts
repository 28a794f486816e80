/** Private-use codepoints, and the opaque codepoint outside BGP services, deserve a second look. */
import { BEHAVIORS, classifyCodepoint, isBehaviorName } from "../../sid/behaviors.js";
import { SidGroups, nodeKeyOf, sidKinds, sidsOfKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

/** Behaviours BGP advertises as services (RFC 8986 §8.4 Table 3): the only place the opaque codepoint is meant for. */
const BGP_SERVICE_BINDINGS: ReadonlySet<string> = new Set(["vrf", "attachment-circuit", "bridge-domain"]);

export const codepointPrivate: Rule = {
  meta: {
    id: "codepoint-private",
    severity: "warning",
    summary: "Keep private-use codepoints inside your own domain and the opaque codepoint for BGP service SIDs.",
    rationale:
      "Codepoints 32768-34815 are for private use: they mean something only to equipment configured the same way, so they must not leave the domain that agreed on them. Codepoint 65535 (opaque) lets a PE hide a service SID's behaviour in BGP; on a SID that the IGP or a controller must understand (End, End.X, End.T, binding SIDs) it hides what remote nodes need to know.",
    source: "RFC 8986 §10.2.1, §8.3, §8.4; RFC 9252 §3.1; IANA SRv6 Endpoint Behaviors registry",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    // per behaviour, once: known and not a BGP service binding (RFC 8986 §8.3)
    const notBgp = Uint8Array.from(t.behaviors, (b) => (isBehaviorName(b) && !BGP_SERVICE_BINDINGS.has(BEHAVIORS[b].binding) ? 1 : 0));
    const kinds = sidKinds(ctx);
    // per kind of SID, once: the key without the node (-1: nothing to report). Private-use
    // codepoints (32768-34815) key by codepoint, the opaque one (65535) by behaviour.
    const keyOf = Int32Array.from({ length: kinds.count }, (_, k) => {
      const cp = kinds.codepoint[k]!;
      if (Number.isNaN(cp)) return -1;
      const c = classifyCodepoint(cp).kind;
      if (c === "private-use") return cp - 0x8000; // RFC 8986 §10.2.1: 32768-34815
      if (c === "opaque" && notBgp[kinds.behavior[k]!] === 1) return 0x800 + kinds.behavior[k]!; // RFC 8986 §8.3
      return -1;
    });
    if (keyOf.every((k) => k < 0)) return;
    const groups = new SidGroups(t);
    const nodes = t.nodeNames.length;
    for (const i of sidsOfKinds(kinds, Uint8Array.from(keyOf, (k) => (k >= 0 ? 1 : 0)))) groups.add(keyOf[kinds.of[i]!]! * nodes + nodeKeyOf(t, i), i, undefined);
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const codepoint = t.codepoint[i]!;
      const kind = classifyCodepoint(codepoint).kind === "private-use" ? "private-use" : "opaque-outside-bgp";
      const sid = t.formatSid(i);
      const n = `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (e.g. ${sid}, ${behavior})`;
      ctx.report({
        message:
          kind === "private-use"
            ? `${n} carry the private-use codepoint ${codepoint}; it means nothing outside equipment configured alike`
            : `${n} carry the opaque codepoint 65535, but ${behavior} is not a BGP service SID`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint:
          kind === "private-use"
            ? "use the registered codepoint if the behaviour has one; otherwise make sure the value never leaves the domain that agreed on it"
            : "advertise the registered codepoint; keep 65535 for service SIDs (End.DX*, End.DT*) advertised in BGP",
        data: { node, sid, behavior, codepoint, kind, count: g.count },
      });
    }
  },
};
