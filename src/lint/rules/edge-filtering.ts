/**
 * Notes on the space a block comes from and what the domain edge must do about it: 5f00::/16 is
 * not globally reachable but still needs an edge filter, unique-local space has its own caveats,
 * global unicast space leaks unless every edge drops it.
 */
import type { SpaceCategory } from "../../net/special.js";
import type { Rule } from "../types.js";
import { hitLabel, scanSpecialSpace } from "../shared/space.js";

const EDGE: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>(["srv6-sid", "unique-local", "global-unicast"]);

/** What to say per kind of space, with its source. */
const NOTE: Readonly<Record<string, { say: string; source: string }>> = {
  // RFC 9602 §5-7: the block is set aside for SIDs, not globally reachable, filtered at the edge.
  "srv6-sid": { say: "the range set aside for SRv6 SIDs: fine; it is not globally reachable, and every domain edge must still drop packets to the block", source: "RFC 9602 §5-7" },
  // RFC 4193 §3.2: the Global ID must be pseudo-random; Abstract: not expected to be routable on
  // the global Internet; §4.3 is about filtering at the site border.
  "unique-local": { say: "unique-local space: its 40-bit Global ID must be pseudo-random (never sequential or well known), it is not globally routed, and the edge must drop it", source: "RFC 4193 §3.2, §4.3" },
  // RFC 8754 §5.1: drop packets to the SID block at every external interface.
  "global-unicast": { say: "global unicast space: reachable from outside unless every external interface drops packets to the block", source: "RFC 8754 §5.1; RFC 9602 §7" },
};

export const edgeFiltering: Rule = {
  meta: {
    id: "edge-filtering",
    severity: "info",
    summary: "Filter the SID block at every edge of the domain; know what the space you chose implies.",
    rationale:
      "SRv6 trusts the SID list, so packets to SIDs must come only from inside the domain: every external interface drops traffic to the SID block. 5f00::/16 makes this easy because it is not globally reachable; unique-local space needs a random Global ID; global unicast space leaks if one edge forgets the filter.",
    source: "RFC 8754 §5.1; RFC 9602 §5-7; RFC 4193 §3.2, §4.3",
    needs: "table",
  },
  check(ctx) {
    for (const h of scanSpecialSpace(ctx, EDGE)) {
      const note = NOTE[h.row.category]!;
      const p = h.subject.text;
      ctx.report({
        message: `${hitLabel(h)} is in ${h.row.text}, ${note.say} (${note.source})`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: `drop packets to ${p} at every external interface of the domain`,
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, category: h.row.category, count: h.count },
      });
    }
  },
};
