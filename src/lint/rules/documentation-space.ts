/** SID space in a documentation prefix (2001:db8::/32, 3fff::/20) is for examples, not networks. */
import type { SpaceCategory } from "../../net/special.js";
import type { Rule } from "../types.js";
import { hitLabel, scanSpecialSpace } from "../shared/space.js";

const DOCUMENTATION: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>(["documentation"]);

export const documentationSpace: Rule = {
  meta: {
    id: "documentation-space",
    severity: "warning",
    summary: "Keep documentation prefixes out of plans meant for a real network.",
    rationale:
      "2001:db8::/32 and 3fff::/20 are reserved for examples: they must not carry real traffic or be advertised, and should not be used for routed production traffic inside a network either; many filters drop them as bogons. Fine in a lab or a demo, wrong in production (set lint.production: true to make it an error).",
    source: "RFC 3849; RFC 9637 §4",
    needs: "table",
  },
  check(ctx) {
    const production = ctx.input.plan?.lint.production === true;
    for (const h of scanSpecialSpace(ctx, DOCUMENTATION)) {
      const p = h.subject.text;
      // RFC 3849; RFC 9637 §4: documentation prefixes are not for real traffic.
      ctx.report({
        message: `${hitLabel(h)} lies in the documentation prefix ${h.row.text} (${h.row.source})${production ? ", and the plan is marked for production" : ""}`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: production ? "renumber into 5f00::/16 (RFC 9602) or the operator's own space before rollout" : "fine for examples and labs; renumber before production",
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, count: h.count, production: production ? "true" : "false" },
        ...(production ? { severity: "error" as const } : {}),
      });
    }
  },
};
