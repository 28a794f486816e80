// Reference copy (object views) of src/lint/rules/codepoint-reserved.ts as it was before the port to the packed table.
/** No SID carries a reserved or unassigned endpoint behaviour codepoint. */
import { formatAddr } from "../../../src/net/text.js";
import { REGISTRY_SNAPSHOT, classifyCodepoint } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const codepointReserved: Rule = {
  meta: RULES["codepoint-reserved"].meta,
  check(ctx) {
    const groups = new Map<string, { first: OwnedSid; count: number; kind: "reserved" | "unassigned" }>();
    for (const s of ctx.sids) {
      const cp = s.entry.codepoint;
      if (cp === undefined) continue;
      const kind = classifyCodepoint(cp).kind; // RFC 8986 §10.2.1 ranges; IANA snapshot
      if (kind !== "reserved" && kind !== "unassigned") continue;
      const key = `${s.node}|${cp}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, kind });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const cp = e.codepoint!;
      const sid = formatAddr(e.sid);
      const why =
        g.kind === "unassigned"
          ? `is not assigned in the IANA registry (snapshot ${REGISTRY_SNAPSHOT})`
          : cp === 0
            ? "is reserved and never allocated"
            : cp === 25
              ? "is registered as Reserved"
              : "lies in the reserved range 34816-65534";
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (e.g. ${sid}, ${e.behavior}) carry codepoint ${cp}, which ${why}`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint:
          g.kind === "unassigned"
            ? "use the registered codepoint of the behaviour; if the value was registered after our snapshot, waive the finding with the registry reference"
            : "use the registered codepoint of the behaviour (1-32767 first come first served, 32768-34815 private use)",
        data: { node: g.first.node, sid, behavior: e.behavior, codepoint: cp, kind: g.kind, count: g.count },
      });
    }
  },
};
