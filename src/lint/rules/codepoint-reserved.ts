/** No SID carries a reserved or unassigned endpoint behaviour codepoint. */
import { REGISTRY_SNAPSHOT, classifyCodepoint } from "../../sid/behaviors.js";
import { SidGroups, nodeKeyOf, sidKinds, sidsOfKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const codepointReserved: Rule = {
  meta: {
    id: "codepoint-reserved",
    severity: "error",
    summary: "Never advertise a reserved or unassigned behaviour codepoint.",
    rationale:
      "Codepoint 0 is never allocated, 25 is registered as reserved, 34816-65534 are reserved, and a value the registry does not list means nothing to other routers: the SID's behaviour cannot be known, so headends and controllers cannot use it safely.",
    source: "RFC 8986 §10.2.1, §10.2.2; IANA SRv6 Endpoint Behaviors registry",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const kinds = sidKinds(ctx);
    // per kind of SID, once: RFC 8986 §10.2.1 ranges; IANA snapshot
    const flagged = Uint8Array.from(kinds.codepoint, (cp) => {
      if (Number.isNaN(cp)) return 0;
      const kind = classifyCodepoint(cp).kind;
      return kind === "reserved" || kind === "unassigned" ? 1 : 0;
    });
    if (!flagged.includes(1)) return;
    const groups = new SidGroups(t);
    const nodes = t.nodeNames.length;
    for (const i of sidsOfKinds(kinds, flagged)) groups.add(t.codepoint[i]! * nodes + nodeKeyOf(t, i), i, undefined);
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const cp = t.codepoint[i]!;
      const kind = classifyCodepoint(cp).kind === "unassigned" ? "unassigned" : "reserved";
      const sid = t.formatSid(i);
      const why =
        kind === "unassigned"
          ? `is not assigned in the IANA registry (snapshot ${REGISTRY_SNAPSHOT})`
          : cp === 0
            ? "is reserved and never allocated"
            : cp === 25
              ? "is registered as Reserved"
              : "lies in the reserved range 34816-65534";
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (e.g. ${sid}, ${behavior}) carry codepoint ${cp}, which ${why}`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint:
          kind === "unassigned"
            ? "use the registered codepoint of the behaviour; if the value was registered after our snapshot, waive the finding with the registry reference"
            : "use the registered codepoint of the behaviour (1-32767 first come first served, 32768-34815 private use)",
        data: { node, sid, behavior, codepoint: cp, kind, count: g.count },
      });
    }
  },
};
