/** A waiver past its expiry date no longer applies and is itself a finding. */
import type { Rule } from "../types.js";

export const waiverExpired: Rule = {
  meta: {
    id: "waiver-expired",
    severity: "warning",
    summary: "Renew or remove waivers whose expiry date has passed.",
    rationale: "Waivers are promises to fix something by a date; an expired waiver means the finding it hid is back and someone should decide again.",
    source: "common practice",
    needs: "plan",
  },
  check(ctx) {
    for (const w of ctx.input.plan!.lint.waivers) {
      if (w.expires >= ctx.input.today) continue;
      ctx.report({
        message: `the waiver of ${w.rule} for ${w.objects.join(", ")} expired on ${w.expires} (reason given: ${w.reason})`,
        location: ctx.locatePlan(["lint", "waivers", w.index, "expires"]),
        objects: [...w.objects],
        hint: "fix the waived finding, or set a new expiry date with a fresh reason",
        data: { rule: w.rule, expires: w.expires },
      });
    }
  },
};
