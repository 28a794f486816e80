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
import { structureTooLong } from "./structure-too-long.js";
import { trailingBits } from "./trailing-bits.js";
import { locatorLength } from "./locator-length.js";
import { hostBits } from "./host-bits.js";
import { argumentUse } from "./argument-use.js";
import { flavorIllegal } from "./flavor-illegal.js";
import { codepointMismatch } from "./codepoint-mismatch.js";
import { codepointReserved } from "./codepoint-reserved.js";
import { codepointPrivate } from "./codepoint-private.js";
import { behaviorUnknown } from "./behavior-unknown.js";
import { csidLength } from "./csid-length.js";
import { csidZero } from "./csid-zero.js";
import { csidPoolOverlap } from "./csid-pool-overlap.js";
import { csidPoolMembership } from "./csid-pool-membership.js";
import { csidDomainMismatch } from "./csid-domain-mismatch.js";
import { csidBlockLength } from "./csid-block-length.js";
import { algorithmValue } from "./algorithm-value.js";
import { nibbleBoundary } from "./nibble-boundary.js";
// --- space, summaries, completeness, capacity (section B)
import { locatorOutsideBlock } from "./locator-outside-block.js";
import { longestMatchTheft } from "./longest-match-theft.js";
import { anycastMismatch } from "./anycast-mismatch.js";
import { reservedSpace } from "./reserved-space.js";
import { documentationSpace } from "./documentation-space.js";
import { edgeFiltering } from "./edge-filtering.js";
import { infrastructureCollision } from "./infrastructure-collision.js";
import { summaryLeak } from "./summary-leak.js";
import { summaryOverlap } from "./summary-overlap.js";
import { summaryUnclean } from "./summary-unclean.js";
import { capacity } from "./capacity.js";
import { missingEnd } from "./missing-end.js";
import { missingEndx } from "./missing-endx.js";
import { missingVrfSid } from "./missing-vrf-sid.js";
import { vrfTableShared } from "./vrf-table-shared.js";
import { blockAggregation } from "./block-aggregation.js";

/** Every rule, in the order they run and are listed. */
export const RULES = {
  "locator-overlap": locatorOverlap,
  "sid-duplicate": sidDuplicate,
  "sid-outside-locator": sidOutsideLocator,
  "table-row": tableRow,
  "waiver-expired": waiverExpired,
  // section A
  "structure-too-long": structureTooLong,
  "trailing-bits": trailingBits,
  "locator-length": locatorLength,
  "host-bits": hostBits,
  "argument-use": argumentUse,
  "flavor-illegal": flavorIllegal,
  "codepoint-mismatch": codepointMismatch,
  "codepoint-reserved": codepointReserved,
  "codepoint-private": codepointPrivate,
  "behavior-unknown": behaviorUnknown,
  "csid-length": csidLength,
  "csid-zero": csidZero,
  "csid-pool-overlap": csidPoolOverlap,
  "csid-pool-membership": csidPoolMembership,
  "csid-domain-mismatch": csidDomainMismatch,
  "csid-block-length": csidBlockLength,
  "algorithm-value": algorithmValue,
  "nibble-boundary": nibbleBoundary,
  // section B
  "locator-outside-block": locatorOutsideBlock,
  "longest-match-theft": longestMatchTheft,
  "anycast-mismatch": anycastMismatch,
  "reserved-space": reservedSpace,
  "documentation-space": documentationSpace,
  "edge-filtering": edgeFiltering,
  "infrastructure-collision": infrastructureCollision,
  "summary-leak": summaryLeak,
  "summary-overlap": summaryOverlap,
  "summary-unclean": summaryUnclean,
  capacity: capacity,
  "missing-end": missingEnd,
  "missing-endx": missingEndx,
  "missing-vrf-sid": missingVrfSid,
  "vrf-table-shared": vrfTableShared,
  "block-aggregation": blockAggregation,
} as const satisfies Record<string, Rule>;

export type RuleId = keyof typeof RULES;

/** The rules as a list. */
export const ALL_RULES: readonly Rule[] = Object.values(RULES);

/** Look up a rule by id. */
export function ruleById(id: string): Rule | undefined {
  return (RULES as Record<string, Rule>)[id];
}
