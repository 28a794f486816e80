/**
 * The SRv6 endpoint behaviour registry: which behaviours a plan may use, what each SID instance is
 * bound to, which flavour sets are legal, and the IANA codepoint of every behaviour + flavour combination.
 */

/**
 * The RFC 8986 endpoint behaviours a plan can instantiate. Headend behaviours (H.Encaps...) are not
 * SIDs and are absent; behaviours from other documents (End.LBS, End.MAP...) are only recognised by
 * {@link classifyCodepoint}.
 */
export type BehaviorName =
  | "End"
  | "End.X"
  | "End.T"
  | "End.DX2"
  | "End.DX2V"
  | "End.DX4"
  | "End.DX6"
  | "End.DT2U"
  | "End.DT2M"
  | "End.DT4"
  | "End.DT6"
  | "End.DT46"
  | "End.B6.Encaps"
  | "End.B6.Encaps.Red"
  | "End.BM";

/** Every {@link BehaviorName}, in the order the type lists them (a stable order for output). */
export const BEHAVIOR_NAMES: readonly BehaviorName[] = Object.freeze([
  "End",
  "End.X",
  "End.T",
  "End.DX2",
  "End.DX2V",
  "End.DX4",
  "End.DX6",
  "End.DT2U",
  "End.DT2M",
  "End.DT4",
  "End.DT6",
  "End.DT46",
  "End.B6.Encaps",
  "End.B6.Encaps.Red",
  "End.BM",
] as const);

/**
 * A behaviour variant: PSP, USP and USD from RFC 8986 §4.16, NEXT-CSID and REPLACE-CSID from RFC 9800.
 * The RFC and the IANA registry spell the compression flavours "CSID"; {@link parseFlavor} also
 * accepts the older "C-SID" spelling.
 */
export type Flavor = "PSP" | "USP" | "USD" | "NEXT-CSID" | "REPLACE-CSID";

/** Canonical flavour order for printing and comparing: PSP, USP, USD, NEXT-CSID, REPLACE-CSID. */
export const FLAVOR_ORDER: readonly Flavor[] = Object.freeze(["PSP", "USP", "USD", "NEXT-CSID", "REPLACE-CSID"] as const);

/**
 * What one SID instance is bound to, i.e. the allocation granularity a planner needs:
 * - `node`: one per node (and per topology/algorithm), like a Prefix-SID;
 * - `adjacency`: one per L3 adjacency or adjacency set, like an Adj-SID;
 * - `table`: one per IPv6 FIB table;
 * - `vrf`: one per VRF (its IPv4 and/or IPv6 table);
 * - `attachment-circuit`: one per customer-facing circuit (CE adjacency, pseudowire, VLAN cross-connect);
 * - `bridge-domain`: one per L2 bridging table;
 * - `policy`: one per SR Policy (Binding SID).
 */
export type Binding = "node" | "adjacency" | "table" | "vrf" | "attachment-circuit" | "bridge-domain" | "policy";

/**
 * Whether a behaviour defines argument bits. Only End.DT2M does (Arg.FE2, RFC 8986 §4.12); for every
 * other behaviour the argument length must be 0 (RFC 9252 §3.2.1).
 */
export type ArgumentUse = "none" | "required";

/**
 * Where a behaviour is advertised: in an IGP End SID sub-TLV, in an IGP End.X SID sub-TLV, in BGP
 * services, or only in BGP-LS (RFC 9352 §10, RFC 9513 §11, RFC 8986 §8.4). A behaviour may be
 * advertised in several places; {@link BehaviorInfo.igp} records the IGP part.
 */
export type SignalledIn = "igp-end" | "igp-endx" | "bgp" | "bgp-ls-only";

/** Static facts about one behaviour (its plain form, without flavours). */
export interface BehaviorInfo {
  /** The behaviour's name as written in RFC 8986 and the IANA registry. */
  readonly name: BehaviorName;
  /** IANA codepoint of the plain behaviour, with no flavour. */
  readonly baseCodepoint: number;
  /** What one SID instance is bound to (RFC 8986 §4.x). */
  readonly binding: Binding;
  /** Whether the behaviour defines argument bits. */
  readonly argument: ArgumentUse;
  /** True when the SID must be the last segment of a SID list (RFC 8986 §4.4–4.12). */
  readonly terminal: boolean;
  /**
   * Which IGP sub-TLV may carry the SID: the End SID sub-TLV, the End.X (and LAN End.X) sub-TLV, or
   * none (RFC 9352 §10, RFC 9513 §11).
   */
  readonly igp: "end" | "endx" | "none";
  /** The section that defines the behaviour, e.g. "RFC 8986 §4.7". */
  readonly rfcSection: string;
  /** One short line saying what the behaviour does. */
  readonly summary: string;
}

function info(
  name: BehaviorName,
  baseCodepoint: number,
  binding: Binding,
  terminal: boolean,
  igp: BehaviorInfo["igp"],
  section: string,
  summary: string,
  argument: ArgumentUse = "none",
): BehaviorInfo {
  return Object.freeze({ name, baseCodepoint, binding, argument, terminal, igp, rfcSection: `RFC 8986 §${section}`, summary });
}

/**
 * Facts for every behaviour, keyed by name. Base codepoints: IANA SRv6 Endpoint Behaviors registry
 * (snapshot 2025-02-28) and RFC 8986 §10.2.2 Table 6. IGP placement: RFC 9352 §10 (End.T has no IS-IS
 * or OSPFv3 placement, and the L2 and binding behaviours are not carried by the IGP).
 */
export const BEHAVIORS: Readonly<Record<BehaviorName, BehaviorInfo>> = Object.freeze({
  End: info("End", 1, "node", false, "end", "4.1", "plain endpoint: advance to the next segment"),
  "End.X": info("End.X", 5, "adjacency", false, "endx", "4.2", "endpoint with cross-connect to a set of L3 adjacencies"),
  "End.T": info("End.T", 9, "table", false, "none", "4.3", "endpoint with lookup of the next segment in a given IPv6 table"),
  // End.DX2 is bound to one outgoing interface (or bundle): a pseudowire end.
  "End.DX2": info("End.DX2", 21, "attachment-circuit", true, "none", "4.9", "decapsulate and send the Ethernet frame out of one interface"),
  // RFC 8986 §4.10 binds End.DX2V to an L2 table used only for a VLAN lookup (flexible
  // cross-connect); for allocation it behaves like a set of cross-connected circuits, not a
  // bridging table, hence attachment-circuit rather than bridge-domain.
  "End.DX2V": info("End.DX2V", 22, "attachment-circuit", true, "none", "4.10", "decapsulate and cross-connect the frame by its VLAN tag"),
  // End.DX4/End.DX6 are per-CE: bound to L3 adjacencies toward a customer edge.
  "End.DX4": info("End.DX4", 17, "attachment-circuit", true, "endx", "4.5", "decapsulate and send the IPv4 packet to a given adjacency"),
  "End.DX6": info("End.DX6", 16, "attachment-circuit", true, "endx", "4.4", "decapsulate and send the IPv6 packet to a given adjacency"),
  "End.DT2U": info("End.DT2U", 23, "bridge-domain", true, "none", "4.11", "decapsulate and bridge the frame by unicast MAC lookup"),
  "End.DT2M": info("End.DT2M", 24, "bridge-domain", true, "none", "4.12", "decapsulate and flood the frame in a bridge table, with split horizon", "required"),
  "End.DT4": info("End.DT4", 19, "vrf", true, "end", "4.7", "decapsulate and look the IPv4 packet up in a VRF table"),
  "End.DT6": info("End.DT6", 18, "vrf", true, "end", "4.6", "decapsulate and look the IPv6 packet up in a VRF table"),
  "End.DT46": info("End.DT46", 20, "vrf", true, "end", "4.8", "decapsulate and look the IPv4 or IPv6 packet up in a VRF"),
  "End.B6.Encaps": info("End.B6.Encaps", 14, "policy", false, "none", "4.13", "binding SID: encapsulate into an SRv6 policy with a new SRH"),
  "End.B6.Encaps.Red": info("End.B6.Encaps.Red", 27, "policy", false, "none", "4.14", "binding SID: as End.B6.Encaps with a reduced SRH"),
  "End.BM": info("End.BM", 15, "policy", false, "none", "4.15", "binding SID: push the label stack of an SR-MPLS policy"),
});

const BEHAVIOR_SET: ReadonlySet<string> = new Set<string>(BEHAVIOR_NAMES);

/** True when `s` is exactly one of the {@link BEHAVIOR_NAMES} (case-sensitive, no trimming). */
export function isBehaviorName(s: string): s is BehaviorName {
  return BEHAVIOR_SET.has(s);
}

/**
 * Canonical flavour list: deduplicated, sorted by FLAVOR_ORDER. The empty list stays empty; values
 * that are not flavours (possible only from untyped callers) are dropped.
 */
export function normalizeFlavors(flavors: readonly Flavor[]): Flavor[] {
  return FLAVOR_ORDER.filter((f) => flavors.includes(f));
}

const FLAVOR_SPELLINGS: ReadonlyMap<string, Flavor> = new Map<string, Flavor>([
  ["psp", "PSP"],
  ["usp", "USP"],
  ["usd", "USD"],
  ["next-csid", "NEXT-CSID"],
  ["next-c-sid", "NEXT-CSID"], // spelling of the RFC 9800 drafts up to -04
  ["replace-csid", "REPLACE-CSID"],
  ["replace-c-sid", "REPLACE-CSID"],
]);

/**
 * Read a flavour name, ignoring case: "psp", "usp", "usd", "next-csid", "next-c-sid", "replace-csid",
 * "replace-c-sid". Returns undefined for anything else, including names with surrounding spaces.
 */
export function parseFlavor(s: string): Flavor | undefined {
  return FLAVOR_SPELLINGS.get(s.toLowerCase());
}

// ---------------------------------------------------------------------------------------------
// Codepoint table. Everything below is computed from these rows, so the registry facts live in
// one place. Source of every number: IANA SRv6 Endpoint Behaviors registry, snapshot 2025-02-28
// (RFC 8986 Table 6 for PSP/USP/USD, RFC 9800 Table 1 for NEXT-CSID/REPLACE-CSID).

const FLAVOR_BIT: Readonly<Record<Flavor, number>> = { PSP: 1, USP: 2, USD: 4, "NEXT-CSID": 8, "REPLACE-CSID": 16 };
const PUD_MASK = FLAVOR_BIT.PSP | FLAVOR_BIT.USP | FLAVOR_BIT.USD;

/**
 * PSP/USP/USD subsets in the column order the registry uses for each flavoured family:
 * plain, PSP, USP, PSP&USP, USD, PSP&USD, USP&USD, PSP&USP&USD.
 */
const PUD_COLUMNS: readonly (readonly Flavor[])[] = [
  [],
  ["PSP"],
  ["USP"],
  ["PSP", "USP"],
  ["USD"],
  ["PSP", "USD"],
  ["USP", "USD"],
  ["PSP", "USP", "USD"],
];

type Eight = readonly [number, number, number, number, number, number, number, number];

/** Behaviours that take PSP/USP/USD (RFC 8986 §4.16): one codepoint per column, per compression flavour. */
const FLAVORED_FAMILIES: readonly { behavior: BehaviorName; plain: Eight; next: Eight; replace: Eight }[] = [
  { behavior: "End", plain: [1, 2, 3, 4, 28, 29, 30, 31], next: [43, 44, 45, 46, 47, 48, 49, 50], replace: [101, 102, 103, 104, 128, 129, 130, 131] },
  { behavior: "End.X", plain: [5, 6, 7, 8, 32, 33, 34, 35], next: [52, 53, 54, 55, 56, 57, 58, 59], replace: [105, 106, 107, 108, 132, 133, 134, 135] },
  { behavior: "End.T", plain: [9, 10, 11, 12, 36, 37, 38, 39], next: [85, 86, 87, 88, 89, 90, 91, 92], replace: [109, 110, 111, 112, 136, 137, 138, 139] },
];

/**
 * Behaviours without PSP/USP/USD: compression-flavoured codepoints. RFC 9800 gives the service
 * behaviours (End.DX*, End.DT*) no NEXT-CSID variant, because they are always the last segment and
 * a NEXT-CSID sequence may end in a SID of any behaviour.
 */
const COMPRESSED_ONLY: readonly { behavior: BehaviorName; next?: number; replace: number }[] = [
  { behavior: "End.B6.Encaps", next: 93, replace: 114 },
  { behavior: "End.B6.Encaps.Red", next: 94, replace: 127 },
  { behavior: "End.BM", next: 95, replace: 115 },
  { behavior: "End.DX6", replace: 116 },
  { behavior: "End.DX4", replace: 117 },
  { behavior: "End.DT6", replace: 118 },
  { behavior: "End.DT4", replace: 119 },
  { behavior: "End.DT46", replace: 120 },
  { behavior: "End.DX2", replace: 121 },
  { behavior: "End.DX2V", replace: 122 },
  { behavior: "End.DT2U", replace: 123 },
  { behavior: "End.DT2M", replace: 124 },
];

const CODEPOINT_BY_KEY = new Map<string, number>();
const COMBINATION_BY_CODEPOINT = new Map<number, { behavior: BehaviorName; mask: number }>();

function key(behavior: BehaviorName, mask: number): string {
  return `${behavior}#${mask}`;
}

function addRow(behavior: BehaviorName, mask: number, codepoint: number): void {
  CODEPOINT_BY_KEY.set(key(behavior, mask), codepoint);
  COMBINATION_BY_CODEPOINT.set(codepoint, { behavior, mask });
}

for (const family of FLAVORED_FAMILIES) {
  for (const [i, column] of PUD_COLUMNS.entries()) {
    const pud = maskOf(column);
    addRow(family.behavior, pud, family.plain[i]!);
    addRow(family.behavior, pud | FLAVOR_BIT["NEXT-CSID"], family.next[i]!);
    addRow(family.behavior, pud | FLAVOR_BIT["REPLACE-CSID"], family.replace[i]!);
  }
}
for (const row of COMPRESSED_ONLY) {
  addRow(row.behavior, 0, BEHAVIORS[row.behavior].baseCodepoint);
  if (row.next !== undefined) addRow(row.behavior, FLAVOR_BIT["NEXT-CSID"], row.next);
  addRow(row.behavior, FLAVOR_BIT["REPLACE-CSID"], row.replace);
}

/**
 * Registered values that are not one of our behaviour + flavour combinations, with the registry's
 * description. This is only what the 2025-02-28 snapshot in our reference lists: values 73, 74 and
 * 76–83 may be registered too but are not in that reference, so they classify as unassigned, and so
 * does anything registered after the snapshot.
 */
const OTHER_REGISTERED: ReadonlyMap<number, string> = new Map<number, string>([
  [13, "End.B6.Insert"], // individual draft
  [26, "End.B6.Insert.Red"], // individual draft
  [40, "End.MAP"], // RFC 9433
  [41, "End.Limit"], // RFC 9433
  [42, "End with NEXT-ONLY-CSID"], // individual draft, not RFC 9800
  [51, "End.X with NEXT-ONLY-CSID"], // individual draft, not RFC 9800
  // 60–68: registered against an individual draft, not RFC 9800; a plan that wants these services
  // in a NEXT-CSID domain uses the plain behaviour (16..24) instead.
  [60, "End.DX6 with NEXT-CSID"],
  [61, "End.DX4 with NEXT-CSID"],
  [62, "End.DT6 with NEXT-CSID"],
  [63, "End.DT4 with NEXT-CSID"],
  [64, "End.DT46 with NEXT-CSID"],
  [65, "End.DX2 with NEXT-CSID"],
  [66, "End.DX2V with NEXT-CSID"],
  [67, "End.DT2U with NEXT-CSID"],
  [68, "End.DT2M with NEXT-CSID"],
  [69, "End.M.GTP6.D"], // RFC 9433
  [70, "End.M.GTP6.Di"], // RFC 9433
  [71, "End.M.GTP6.E"], // RFC 9433
  [72, "End.M.GTP4.E"], // RFC 9433
  [75, "End.Replicate"], // RFC 9524
  [84, "End.NSH"], // RFC 9491
  [96, "End.LBS with NEXT-CSID"], // RFC 9800 §7
  [97, "End.XLBS with NEXT-CSID"], // RFC 9800 §7
  [140, "End.LBS with REPLACE-CSID"], // RFC 9800 §7
  [141, "End.XLBS with REPLACE-CSID"], // RFC 9800 §7
  [32767, "The SID defined in RFC 8754"],
]);

/** Codepoint 25 sits inside the FCFS range but is registered as "Reserved" (RFC 8986 §10.2.2). */
const RESERVED_IN_FCFS: ReadonlySet<number> = new Set([25]);

function maskOf(flavors: readonly Flavor[]): number {
  let mask = 0;
  for (const f of flavors) mask |= FLAVOR_BIT[f];
  return mask;
}

function isFlavor(f: string): f is Flavor {
  return (FLAVOR_ORDER as readonly string[]).includes(f);
}

function quoteList(values: readonly string[]): string {
  return values.map((v) => `"${v}"`).join(", ");
}

/** What a behaviour accepts, in words, derived from the codepoint table. */
function allowedText(behavior: BehaviorName): string {
  const pud = CODEPOINT_BY_KEY.has(key(behavior, FLAVOR_BIT.PSP));
  const next = CODEPOINT_BY_KEY.has(key(behavior, FLAVOR_BIT["NEXT-CSID"]));
  const replace = CODEPOINT_BY_KEY.has(key(behavior, FLAVOR_BIT["REPLACE-CSID"]));
  const compression = [next ? '"NEXT-CSID"' : undefined, replace ? '"REPLACE-CSID"' : undefined].filter((s) => s !== undefined);
  if (pud) return `no flavour, or any combination of "PSP", "USP" and "USD", optionally with one of ${compression.join(" or ")}`;
  if (compression.length === 0) return "no flavour";
  if (compression.length === 1) return `no flavour or ${compression[0]}`;
  return `no flavour, ${compression.join(" or ")}`;
}

/**
 * Why a flavour set is not legal for a behaviour, or undefined when it is legal. Message quotes the
 * values and says what is allowed.
 *
 * The set is read as a set: order and duplicates do not matter, and the empty set (the plain
 * behaviour) is always legal. Illegal are: NEXT-CSID together with REPLACE-CSID; PSP, USP or USD on
 * anything but End, End.X and End.T (RFC 8986 §4.16); NEXT-CSID on End.DX* / End.DT* (RFC 9800
 * registers no such codepoint — in a NEXT-CSID domain these services use the behaviour without the
 * flavour, placed under the node's CSID). A result of undefined means {@link codepointOf} has a value.
 */
export function flavorProblem(behavior: BehaviorName, flavors: readonly Flavor[]): string | undefined {
  if (!isBehaviorName(behavior)) {
    return `unknown behaviour "${String(behavior)}"; expected one of ${quoteList(BEHAVIOR_NAMES)}`;
  }
  const unknown = flavors.filter((f) => !isFlavor(f));
  if (unknown.length > 0) {
    return `unknown flavour ${quoteList(unknown.map(String))}; expected one of ${quoteList(FLAVOR_ORDER)}`;
  }
  const set = normalizeFlavors(flavors);
  const mask = maskOf(set);
  const allowed = `"${behavior}" allows ${allowedText(behavior)}`;
  if (set.includes("NEXT-CSID") && set.includes("REPLACE-CSID")) {
    // The registry has no codepoint carrying both compression flavours.
    return `flavours "NEXT-CSID" and "REPLACE-CSID" cannot be combined on one SID; pick one. ${allowed}`;
  }
  const pud = set.filter((f) => (FLAVOR_BIT[f] & PUD_MASK) !== 0);
  if (pud.length > 0 && !CODEPOINT_BY_KEY.has(key(behavior, FLAVOR_BIT.PSP))) {
    // RFC 8986 §4.16: PSP, USP and USD are variants of End, End.X and End.T only.
    const noun = pud.length === 1 ? "flavour" : "flavours";
    return `${noun} ${quoteList(pud)} not defined for "${behavior}": PSP, USP and USD apply only to "End", "End.X" and "End.T" (RFC 8986 §4.16). ${allowed}`;
  }
  if (set.includes("NEXT-CSID") && !CODEPOINT_BY_KEY.has(key(behavior, mask))) {
    const base = BEHAVIORS[behavior].baseCodepoint;
    return (
      `flavour "NEXT-CSID" is not registered for "${behavior}" by RFC 9800; use the behaviour without the flavour ` +
      `("${behavior}", codepoint ${base}), which may end a NEXT-CSID sequence under the node's CSID. ${allowed}`
    );
  }
  if (!CODEPOINT_BY_KEY.has(key(behavior, mask))) {
    // Unreachable with the current table; kept so a table edit cannot make this function lie.
    return `flavours ${quoteList(set)} have no registered codepoint for "${behavior}". ${allowed}`;
  }
  return undefined;
}

/**
 * The IANA codepoint of behaviour + flavours, or undefined when the registry has no such combination.
 *
 * Flavour order and duplicates do not matter. End.DT4 + NEXT-CSID (and the other services with
 * NEXT-CSID) give undefined: RFC 9800 registers none, and such services use the plain codepoint.
 */
export function codepointOf(behavior: BehaviorName, flavors: readonly Flavor[]): number | undefined {
  if (!flavors.every((f) => isFlavor(f))) return undefined;
  return CODEPOINT_BY_KEY.get(key(behavior, maskOf(flavors)));
}

/**
 * What a 16-bit codepoint means in the registry:
 * - `behavior`: one of our behaviours with a canonical (normalized) flavour list;
 * - `other-registered`: registered for something this tool does not plan (e.g. 13 End.B6.Insert,
 *   40 End.MAP, 60–68 individual-draft NEXT-CSID variants, 96 End.LBS with NEXT-CSID), with the
 *   registry's description;
 * - `reserved`: 0, 25 (registered as Reserved) and 34816–65534;
 * - `private-use`: 32768–34815;
 * - `opaque`: 65535, used to hide a service SID's real behaviour;
 * - `unassigned`: everything else in 1–32767 that our snapshot does not list.
 */
export type CodepointClass =
  | { kind: "behavior"; behavior: BehaviorName; flavors: Flavor[] }
  | { kind: "other-registered"; name: string }
  | { kind: "reserved" }
  | { kind: "private-use" }
  | { kind: "opaque" }
  | { kind: "unassigned" };

/**
 * Classify any 16-bit codepoint. Values outside 0..65535 or non-integers -> unassigned is NOT ok:
 * throw RangeError (programmer error).
 *
 * Ranges follow RFC 8986 §10.2.1. Only values in the 2025-02-28 registry snapshot are known; a value
 * registered later (or one of 73, 74, 76–83, which our reference does not list) comes back as
 * `unassigned`. Each call returns a fresh object the caller may modify.
 */
export function classifyCodepoint(cp: number): CodepointClass {
  if (!Number.isInteger(cp) || cp < 0 || cp > 0xffff) {
    throw new RangeError(`codepoint ${String(cp)} is not an integer in 0..65535`);
  }
  if (cp === 0 || RESERVED_IN_FCFS.has(cp)) return { kind: "reserved" };
  if (cp === 0xffff) return { kind: "opaque" };
  if (cp >= 0x8000 && cp <= 0x87ff) return { kind: "private-use" };
  if (cp >= 0x8800) return { kind: "reserved" };
  const combination = COMBINATION_BY_CODEPOINT.get(cp);
  if (combination !== undefined) {
    const flavors = FLAVOR_ORDER.filter((f) => (combination.mask & FLAVOR_BIT[f]) !== 0);
    return { kind: "behavior", behavior: combination.behavior, flavors };
  }
  const name = OTHER_REGISTERED.get(cp);
  if (name !== undefined) return { kind: "other-registered", name };
  return { kind: "unassigned" };
}

/** "Last Updated" date of the IANA SRv6 Endpoint Behaviors registry snapshot encoded here. */
export const REGISTRY_SNAPSHOT: string = "2025-02-28";
