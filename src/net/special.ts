/**
 * The address-space facts table: every IPv6 range that the IANA registries single out, one row
 * each with its reference, and the classification predicates computed from that table.
 *
 * Two IANA registries feed the table (snapshot dates in REGISTRY_SNAPSHOTS):
 *  - "special-purpose": the IANA IPv6 Special-Purpose Address Registry. Its Forwardable and
 *    Globally Reachable columns are copied as they stand; "N/A" in the registry (and the
 *    terminated ORCHID row, which has no flags) becomes "n/a".
 *  - "address-space": the IANA Internet Protocol Version 6 Address Space registry, plus the
 *    deprecated IPv4-compatible prefix that its notes mention. That registry has no reachability
 *    columns, so these rows say "n/a" unless another document settles the question (noted beside
 *    the row).
 * Together the rows cover all of ::/0: every address lies in at least one address-space row or
 * in one of the special-purpose rows fc00::/7 and fe80::/10 (which both registries list; they
 * appear once, as special-purpose rows).
 */
import { Prefix, comparePrefixes } from "./prefix.js";
import { parsePrefixParts } from "./text.js";
import { hostMask } from "./uint128.js";

/** What a range is for; several rows may share a category (e.g. the two documentation blocks). */
export type SpaceCategory =
  | "loopback"
  | "unspecified"
  | "ipv4-mapped"
  | "ipv4-compatible"
  | "nat64"
  | "discard"
  | "ietf-protocol"
  | "teredo"
  | "benchmarking"
  | "orchid"
  | "documentation"
  | "6to4"
  | "srv6-sid"
  | "unique-local"
  | "link-local"
  | "site-local-deprecated"
  | "multicast"
  | "reserved-by-ietf"
  | "global-unicast"
  | "anycast-service"
  | "other-special";

/** One row of the table. */
export interface SpaceRange {
  /** The range, parsed once at module load from `text` (never has host bits). */
  readonly prefix: Prefix;
  /** The range as the registry writes it, in RFC 5952 canonical form, e.g. "5f00::/16". */
  readonly text: string;
  /** The registry's name for the row, e.g. "Segment Routing (SRv6) SIDs". */
  readonly name: string;
  readonly category: SpaceCategory;
  /** The defining documents and the registry, e.g. "RFC 9602; IANA IPv6 Special-Purpose Address Registry". */
  readonly source: string;
  /** Which IANA registry the row comes from. */
  readonly registry: "special-purpose" | "address-space";
  /**
   * The special-purpose registry's Globally Reachable column ("n/a" where it says N/A). Address-space
   * rows have no such column: "n/a", except 2000::/3 (true) and fec0::/10 (false, RFC 3879 §4).
   */
  readonly globallyReachable: boolean | "n/a";
  /** The Forwardable column, with the same rules as globallyReachable. */
  readonly forwardable: boolean | "n/a";
}

/** "Last Updated" dates of the registry snapshots the table was checked against. */
export const REGISTRY_SNAPSHOTS = { specialPurpose: "2024-10-22", addressSpace: "2024-09-10" } as const satisfies {
  readonly specialPurpose: "2024-10-22";
  readonly addressSpace: "2024-09-10";
};

const SP = "IANA IPv6 Special-Purpose Address Registry";
const AS = "IANA IPv6 Address Space registry";

type Row = Omit<SpaceRange, "prefix">;

const ROWS: readonly Row[] = [
  // ---- IANA IPv6 Special-Purpose Address Registry, Last Updated 2024-10-22 (registry order) ----
  { text: "::1/128",            name: "Loopback Address",                       category: "loopback",        source: `RFC 4291; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  { text: "::/128",             name: "Unspecified Address",                    category: "unspecified",     source: `RFC 4291; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  { text: "::ffff:0:0/96",      name: "IPv4-mapped Address",                    category: "ipv4-mapped",     source: `RFC 4291; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  // The registry abbreviates both NAT64 names as "IPv4-IPv6 Translat."; the well-known prefix is
  // globally reachable, the local-use one (RFC 8215) is not.
  { text: "64:ff9b::/96",       name: "IPv4-IPv6 Translat.",                    category: "nat64",           source: `RFC 6052; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "64:ff9b:1::/48",     name: "IPv4-IPv6 Translat.",                    category: "nat64",           source: `RFC 8215; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: false },
  { text: "100::/64",           name: "Discard-Only Address Block",             category: "discard",         source: `RFC 6666; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: false },
  // False "unless a more specific entry says otherwise": the rows inside 2001::/23 below carry
  // their own flags, and the most specific row wins.
  { text: "2001::/23",          name: "IETF Protocol Assignments",              category: "ietf-protocol",   source: `RFC 2928; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  // Globally Reachable N/A: the registry defers to RFC 4380 §5.
  { text: "2001::/32",          name: "TEREDO",                                 category: "teredo",          source: `RFC 4380; RFC 8190; ${SP}`,      registry: "special-purpose", forwardable: true,  globallyReachable: "n/a" },
  { text: "2001:1::1/128",      name: "Port Control Protocol Anycast",          category: "anycast-service", source: `RFC 7723; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "2001:1::2/128",      name: "Traversal Using Relays around NAT Anycast", category: "anycast-service", source: `RFC 8155; ${SP}`,             registry: "special-purpose", forwardable: true,  globallyReachable: true },
  // The snapshot still cites the Internet-Draft for this row.
  { text: "2001:1::3/128",      name: "DNS-SD Service Registration Protocol Anycast", category: "anycast-service", source: `draft-ietf-dnssd-srp-25; ${SP}`, registry: "special-purpose", forwardable: true, globallyReachable: true },
  { text: "2001:2::/48",        name: "Benchmarking",                           category: "benchmarking",    source: `RFC 5180; RFC Errata 1752; ${SP}`, registry: "special-purpose", forwardable: true, globallyReachable: false },
  { text: "2001:3::/32",        name: "AMT",                                    category: "other-special",   source: `RFC 7450; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "2001:4:112::/48",    name: "AS112-v6",                               category: "other-special",   source: `RFC 7535; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  // Terminated 2014-03; the row keeps the space set aside but carries no flags.
  { text: "2001:10::/28",       name: "Deprecated (previously ORCHID)",         category: "orchid",          source: `RFC 4843; ${SP}`,                registry: "special-purpose", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "2001:20::/28",       name: "ORCHIDv2",                               category: "orchid",          source: `RFC 7343; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "2001:30::/28",       name: "Drone Remote ID Protocol Entity Tags (DETs) Prefix", category: "other-special", source: `RFC 9374; ${SP}`,      registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "2001:db8::/32",      name: "Documentation",                          category: "documentation",   source: `RFC 3849; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  // Globally Reachable N/A: the registry defers to RFC 3056.
  { text: "2002::/16",          name: "6to4",                                   category: "6to4",            source: `RFC 3056; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: "n/a" },
  { text: "2620:4f:8000::/48",  name: "Direct Delegation AS112 Service",        category: "other-special",   source: `RFC 7534; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: true },
  { text: "3fff::/20",          name: "Documentation",                          category: "documentation",   source: `RFC 9637; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },
  // RFC 9602 §6: forwardable, but not globally reachable; it lies in 4000::/3, outside 2000::/3.
  { text: "5f00::/16",          name: "Segment Routing (SRv6) SIDs",            category: "srv6-sid",        source: `RFC 9602; ${SP}`,                registry: "special-purpose", forwardable: true,  globallyReachable: false },
  { text: "fc00::/7",           name: "Unique-Local",                           category: "unique-local",    source: `RFC 4193; RFC 8190; ${SP}`,      registry: "special-purpose", forwardable: true,  globallyReachable: false },
  { text: "fe80::/10",          name: "Link-Local Unicast",                     category: "link-local",      source: `RFC 4291; ${SP}`,                registry: "special-purpose", forwardable: false, globallyReachable: false },

  // ---- IANA Internet Protocol Version 6 Address Space, Last Updated 2024-09-10 ----
  // ::/96 is not a row of that registry but of its notes: "previously IPv4-compatible",
  // deprecated by RFC 4291 §2.5.5.1. It sits inside ::/8.
  { text: "::/96",              name: "IPv4-Compatible IPv6 Address (deprecated)", category: "ipv4-compatible", source: `RFC 4291 §2.5.5.1; ${AS}`,    registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "::/8",               name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "100::/8",            name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  // Formerly the NSAP allocation, since deprecated.
  { text: "200::/7",            name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "400::/6",            name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "800::/5",            name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "1000::/4",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  // IANA makes unicast assignments only from here; outside the special rows it is reachable.
  { text: "2000::/3",           name: "Global Unicast",                         category: "global-unicast",  source: `RFC 4291 §2.4; ${AS}`,           registry: "address-space", forwardable: true,  globallyReachable: true },
  // Holds 5f00::/16; 5f00::/8 was used by the 6bone and returned (registry note).
  { text: "4000::/3",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "6000::/3",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "8000::/3",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "a000::/3",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "c000::/3",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "e000::/4",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "f000::/5",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "f800::/6",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  { text: "fe00::/9",           name: "Reserved by IETF",                       category: "reserved-by-ietf", source: `RFC 4291; ${AS}`,               registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
  // Formerly site-local; RFC 3879 §4 deprecates it and says routers should not route it by default.
  { text: "fec0::/10",          name: "Reserved by IETF (formerly Site-Local)", category: "site-local-deprecated", source: `RFC 3879; ${AS}`,          registry: "address-space", forwardable: false, globallyReachable: false },
  // Reachability depends on the scope field (RFC 4291 §2.7), not on the prefix.
  { text: "ff00::/8",           name: "Multicast",                              category: "multicast",       source: `RFC 4291 §2.7; ${AS}`,           registry: "address-space", forwardable: "n/a", globallyReachable: "n/a" },
];

function load(row: Row): SpaceRange {
  const r = parsePrefixParts(row.text);
  // A bad row is a bug in this file, found at module load.
  if (!r.ok) throw new Error(`special-range table: ${r.reason}`);
  if ((r.value.addr & hostMask(r.value.len)) !== 0n) throw new Error(`special-range table: ${row.text} has host bits`);
  return Object.freeze({ ...row, prefix: new Prefix(r.value.addr, r.value.len) });
}

/**
 * Every row, sorted by first address and then shorter prefix first (so a range comes before the
 * ranges nested in it). Prefixes are unique; the rows nest or are disjoint, as prefixes always do.
 */
export const SPECIAL_RANGES: readonly SpaceRange[] = Object.freeze(
  ROWS.map(load).sort((a, b) => comparePrefixes(a.prefix, b.prefix)),
);

/** Most specific (longest) first; equal lengths cannot overlap, so address order settles ties. */
function mostSpecificFirst(a: SpaceRange, b: SpaceRange): number {
  return b.prefix.len - a.prefix.len || comparePrefixes(a.prefix, b.prefix);
}

/**
 * Every range that contains all of `p`, most specific first. Host bits of `p` are ignored. Empty
 * only for a prefix wider than every top-level row (e.g. ::/0, or 2000::/2).
 */
export function rangesContaining(p: Prefix): SpaceRange[] {
  return SPECIAL_RANGES.filter((r) => p.isSubnetOf(r.prefix)).sort(mostSpecificFirst);
}

/**
 * Every range sharing at least one address with `p` (those containing it and those nested in it),
 * most specific first. ::/0 overlaps every row.
 */
export function rangesOverlapping(p: Prefix): SpaceRange[] {
  return SPECIAL_RANGES.filter((r) => r.prefix.overlaps(p)).sort(mostSpecificFirst);
}

/**
 * The most specific range containing all of `p`; for a single address pass `new Prefix(a, 128)`.
 * Every address, and every prefix of length 10 or more, falls under some row. Throws RangeError
 * for a prefix that spans several top-level rows (::/0, 2000::/2, ...): no single row describes
 * it — use rangesOverlapping for those.
 */
export function classify(p: Prefix): SpaceRange {
  const r = rangesContaining(p)[0];
  if (r === undefined) throw new RangeError(`${p.masked().format()} spans several address-space rows; use rangesOverlapping`);
  return r;
}

/**
 * True when every address of `p` is globally reachable according to the registry's Globally
 * Reachable column, the most specific row deciding for each address. "n/a" counts as not
 * reachable; plain 2000::/3 space is reachable. For a single address this is just the flag of
 * classify(); a wider prefix is reachable only if no part of it falls under a false or "n/a"
 * row — so 2001::/16 is not (it holds 2001::/23), while 2001:20::/28 is.
 */
export function isGloballyReachable(p: Prefix): boolean {
  return effectiveRows(p).every((r) => r.globallyReachable === true);
}

/**
 * The rows that are the most specific row for at least one address of `p`. A row overlapping
 * `p` decides for the part of (row ∩ p) that more specific rows leave uncovered; it counts when
 * that part is not empty. Rows are prefixes, so (row ∩ p) is the longer of the two: when a more
 * specific row holds all of `p` the part is empty; otherwise the rows nested inside the
 * intersection are disjoint or nested, and the maximal ones among them are summed.
 */
function effectiveRows(p: Prefix): SpaceRange[] {
  const rows = rangesOverlapping(p);
  return rows.filter((r) => {
    // a more specific row holding all of p decides for every address of p
    if (rows.some((c) => c.prefix.len > r.prefix.len && p.isSubnetOf(c.prefix))) return false;
    const inter = r.prefix.len >= p.len ? r.prefix : p.masked();
    const nested = rows.filter((c) => c.prefix.len > r.prefix.len && c.prefix.isSubnetOf(inter));
    let covered = 0n;
    for (const c of nested) {
      const inside = nested.some((o) => o !== c && o.prefix.len < c.prefix.len && c.prefix.isSubnetOf(o.prefix));
      if (!inside) covered += c.prefix.size;
    }
    return covered < inter.size;
  });
}
