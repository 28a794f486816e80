/**
 * The rule registry: every rule, closed over the list of rule ids so that a rule missing from the
 * registry (or an id without a rule) fails to compile. Each section is kept by one area of rules.
 */
import type { Rule } from "../types.js";
// --- overlap, duplicates, table reading, waivers
import { locatorOverlap } from "./locator-overlap.js";
import { sidDuplicate } from "./sid-duplicate.js";
import { sidOutsideLocator } from "./sid-outside-locator.js";
import { tableRow } from "./table-row.js";
import { waiverExpired } from "./waiver-expired.js";
// --- structure, codepoints, compressed SIDs (section A)
// --- space, summaries, completeness, capacity (section B)

/** Every rule, in the order they run and are listed. */
export const RULES = {
  "locator-overlap": locatorOverlap,
  "sid-duplicate": sidDuplicate,
  "sid-outside-locator": sidOutsideLocator,
  "table-row": tableRow,
  "waiver-expired": waiverExpired,
  // section A
  // section B
} as const satisfies Record<string, Rule>;

export type RuleId = keyof typeof RULES;

/** The rules as a list. */
export const ALL_RULES: readonly Rule[] = Object.values(RULES);

/** Look up a rule by id. */
export function ruleById(id: string): Rule | undefined {
  return (RULES as Record<string, Rule>)[id];
}
