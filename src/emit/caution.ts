/** The caution every emitted sheet and the README carry. */

/** One paragraph, plain text; printed into every SID table and report we write. */
export const CAUTION =
  "Caution: this SID plan was computed by sidcarve. Check it in a lab before rollout and follow " +
  "the operator's change process; vendor documentation and local policy prevail over this sheet.";
