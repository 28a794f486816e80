/**
 * SID space must not come from ranges the IANA registries set aside for something else (loopback,
 * link-local, multicast, IPv4 embedding, transition mechanisms, other IETF protocols, space still
 * "Reserved by IETF").
 */
import type { SpaceCategory } from "../../net/special.js";
import type { Rule } from "../types.js";
import { hitLabel, scanSpecialSpace } from "../shared/space.js";

/** The categories this rule refuses (IANA IPv6 Special-Purpose Address Registry; IANA IPv6 Address Space registry). */
export const RESERVED: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>([
  "loopback", // RFC 4291
  "unspecified", // RFC 4291
  "ipv4-mapped", // RFC 4291
  "ipv4-compatible", // RFC 4291 §2.5.5.1 (deprecated)
  "link-local", // RFC 4291 §2.5.6: routers must not forward it
  "multicast", // RFC 4291 §2.7
  "site-local-deprecated", // RFC 3879 §4
  "6to4", // RFC 3056
  "teredo", // RFC 4380
  "discard", // RFC 6666
  "benchmarking", // RFC 5180
  "nat64", // RFC 6052, RFC 8215
  "orchid", // RFC 4843, RFC 7343
  "ietf-protocol", // RFC 2928
  "other-special", // AMT, AS112, DETs: IANA IPv6 Special-Purpose Address Registry
  "anycast-service", // RFC 7723, RFC 8155
  // "Reserved by IETF" space (IANA IPv6 Address Space registry). 5f00::/16 inside 4000::/3 is a
  // more specific row of its own (RFC 9602), so it never lands here.
  "reserved-by-ietf",
]);

export const reservedSpace: Rule = {
  meta: {
    id: "reserved-space",
    severity: "error",
    summary: "Take blocks, locators and SIDs only from space meant for SRv6: not from loopback, link-local, multicast, IPv4-embedding, transition, other protocol or IETF-reserved ranges.",
    rationale:
      "These ranges have a fixed meaning: routers refuse to forward some of them (loopback, link-local, site-local), others belong to transition mechanisms or other protocols, and IETF-reserved space may be assigned tomorrow. SIDs there are dropped or collide with that use. 5f00::/16 is the range set aside for SRv6 SIDs.",
    source: "IANA IPv6 Special-Purpose Address Registry; IANA IPv6 Address Space registry; RFC 4291; RFC 3879; RFC 9602",
    needs: "table",
  },
  check(ctx) {
    for (const h of scanSpecialSpace(ctx, RESERVED)) {
      const p = h.subject.text;
      ctx.report({
        message: `${hitLabel(h)} falls in ${h.row.text} (${h.row.name}, ${h.row.source}), which is not SID space`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: "carve SIDs from 5f00::/16 (RFC 9602) or from the operator's own global unicast space",
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, category: h.row.category, count: h.count },
      });
    }
  },
};
