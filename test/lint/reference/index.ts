/**
 * The rules of structure, codepoints and compressed SIDs as they were written on the object views
 * (ctx.sids / ctx.locators), before their port to the packed table. They are the readable
 * reference: test/lint/ported.test.ts checks that the ported rules give the same findings.
 */
import type { Rule } from "../../../src/lint/types.js";
import { algorithmValue } from "./algorithm-value.js";
import { argumentUse } from "./argument-use.js";
import { behaviorUnknown } from "./behavior-unknown.js";
import { codepointMismatch } from "./codepoint-mismatch.js";
import { codepointPrivate } from "./codepoint-private.js";
import { codepointReserved } from "./codepoint-reserved.js";
import { csidBlockLength } from "./csid-block-length.js";
import { csidDomainMismatch } from "./csid-domain-mismatch.js";
import { csidLength } from "./csid-length.js";
import { csidPoolMembership } from "./csid-pool-membership.js";
import { csidZero } from "./csid-zero.js";
import { flavorIllegal } from "./flavor-illegal.js";
import { hostBits } from "./host-bits.js";
import { locatorLength } from "./locator-length.js";
import { locatorOverlap } from "./locator-overlap.js";
import { nibbleBoundary } from "./nibble-boundary.js";
import { sidDuplicate } from "./sid-duplicate.js";
import { sidOutsideLocator } from "./sid-outside-locator.js";
import { structureTooLong } from "./structure-too-long.js";
import { trailingBits } from "./trailing-bits.js";

export const REFERENCE_RULES: readonly Rule[] = [
  locatorOverlap,
  sidDuplicate,
  sidOutsideLocator,
  structureTooLong,
  trailingBits,
  locatorLength,
  hostBits,
  argumentUse,
  flavorIllegal,
  codepointMismatch,
  codepointReserved,
  codepointPrivate,
  behaviorUnknown,
  csidLength,
  csidZero,
  csidPoolMembership,
  csidDomainMismatch,
  csidBlockLength,
  algorithmValue,
  nibbleBoundary,
];
