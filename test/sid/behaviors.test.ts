// Tests for the SRv6 endpoint behaviour registry: codepoints checked against the IANA registry
// snapshot, flavour rules against RFC 8986 §4.16 and RFC 9800, placement against RFC 9352 §10.
import { describe, it, expect } from "vitest";
import {
  BEHAVIOR_NAMES,
  BEHAVIORS,
  FLAVOR_ORDER,
  REGISTRY_SNAPSHOT,
  classifyCodepoint,
  codepointOf,
  flavorProblem,
  isBehaviorName,
  normalizeFlavors,
  parseFlavor,
  type BehaviorName,
  type Flavor,
} from "../../src/sid/behaviors.js";

/** Every subset of the five flavours (32 of them), each in FLAVOR_ORDER. */
function allFlavorSubsets(): Flavor[][] {
  const all: Flavor[] = ["PSP", "USP", "USD", "NEXT-CSID", "REPLACE-CSID"];
  const out: Flavor[][] = [];
  for (let mask = 0; mask < 1 << all.length; mask++) out.push(all.filter((_, i) => (mask & (1 << i)) !== 0));
  return out;
}

describe("names and order", () => {
  it("lists the fifteen behaviours in the agreed order", () => {
    expect(BEHAVIOR_NAMES).toEqual([
      "End", "End.X", "End.T", "End.DX2", "End.DX2V", "End.DX4", "End.DX6", "End.DT2U", "End.DT2M",
      "End.DT4", "End.DT6", "End.DT46", "End.B6.Encaps", "End.B6.Encaps.Red", "End.BM",
    ]);
  });

  it("has one BEHAVIORS entry per name, keyed by its own name", () => {
    expect(Object.keys(BEHAVIORS).sort()).toEqual([...BEHAVIOR_NAMES].sort());
    for (const name of BEHAVIOR_NAMES) expect(BEHAVIORS[name].name).toBe(name);
  });

  it("orders flavours PSP, USP, USD, NEXT-CSID, REPLACE-CSID", () => {
    expect(FLAVOR_ORDER).toEqual(["PSP", "USP", "USD", "NEXT-CSID", "REPLACE-CSID"]);
  });

  it("records the registry snapshot date", () => {
    // IANA SRv6 Endpoint Behaviors registry, "Last Updated" of the snapshot used
    expect(REGISTRY_SNAPSHOT).toBe("2025-02-28");
  });

  it.each([
    ["End", true],
    ["End.DT2M", true],
    ["End.B6.Encaps.Red", true],
    ["end", false], // names are case-sensitive
    ["End.DT64", false], // RFC 9513 §11 misprint for End.DT46, not a behaviour
    ["End.B6.BM", false], // RFC 8986 §8.4 Table 3 misprint for End.BM, not a behaviour
    ["End.LBS", false], // RFC 9800 §7 behaviour, known only to classifyCodepoint
    ["toString", false], // must not be fooled by Object.prototype
    ["", false],
    [" End", false],
  ])("isBehaviorName(%j) is %s", (s, expected) => {
    expect(isBehaviorName(s)).toBe(expected);
  });
});

describe("behaviour facts", () => {
  // [behaviour, base codepoint, binding, argument, terminal, igp, section]
  // codepoints: IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28) and RFC 8986 §10.2.2 Table 6;
  // binding/argument/terminal: RFC 8986 §4.x as named; igp: RFC 9352 §10 Table 1.
  const rows: [BehaviorName, number, string, string, boolean, string, string][] = [
    ["End", 1, "node", "none", false, "end", "RFC 8986 §4.1"], // RFC 8986 §4.1; RFC 9352 §10 End SID
    ["End.X", 5, "adjacency", "none", false, "endx", "RFC 8986 §4.2"], // RFC 8986 §4.2; RFC 9352 §10 End.X SID
    ["End.T", 9, "table", "none", false, "none", "RFC 8986 §4.3"], // RFC 8986 §4.3; RFC 9352 §10 has no End.T
    ["End.DX6", 16, "attachment-circuit", "none", true, "endx", "RFC 8986 §4.4"], // RFC 8986 §4.4 (per-CE); RFC 9352 §10 End.X SID
    ["End.DX4", 17, "attachment-circuit", "none", true, "endx", "RFC 8986 §4.5"], // RFC 8986 §4.5 (per-CE); RFC 9352 §10 End.X SID
    ["End.DT6", 18, "vrf", "none", true, "end", "RFC 8986 §4.6"], // RFC 8986 §4.6; RFC 9352 §10 End SID
    ["End.DT4", 19, "vrf", "none", true, "end", "RFC 8986 §4.7"], // RFC 8986 §4.7; RFC 9352 §10 End SID
    ["End.DT46", 20, "vrf", "none", true, "end", "RFC 8986 §4.8"], // RFC 8986 §4.8; RFC 9352 §10 End SID
    ["End.DX2", 21, "attachment-circuit", "none", true, "none", "RFC 8986 §4.9"], // RFC 8986 §4.9; not in RFC 9352 §10
    ["End.DX2V", 22, "attachment-circuit", "none", true, "none", "RFC 8986 §4.10"], // RFC 8986 §4.10 (VLAN cross-connect)
    ["End.DT2U", 23, "bridge-domain", "none", true, "none", "RFC 8986 §4.11"], // RFC 8986 §4.11
    ["End.DT2M", 24, "bridge-domain", "required", true, "none", "RFC 8986 §4.12"], // RFC 8986 §4.12 Arg.FE2
    ["End.B6.Encaps", 14, "policy", "none", false, "none", "RFC 8986 §4.13"], // RFC 8986 §4.13
    ["End.B6.Encaps.Red", 27, "policy", "none", false, "none", "RFC 8986 §4.14"], // RFC 8986 §4.14
    ["End.BM", 15, "policy", "none", false, "none", "RFC 8986 §4.15"], // RFC 8986 §4.15
  ];

  it("covers every behaviour", () => {
    expect(rows.map((r) => r[0]).sort()).toEqual([...BEHAVIOR_NAMES].sort());
  });

  it.each(rows)("%s: codepoint %i, bound to %s, argument %s, terminal %s, igp %s, %s", (name, cp, binding, argument, terminal, igp, section) => {
    const b = BEHAVIORS[name];
    expect(b.baseCodepoint).toBe(cp);
    expect(b.binding).toBe(binding);
    expect(b.argument).toBe(argument);
    expect(b.terminal).toBe(terminal);
    expect(b.igp).toBe(igp);
    expect(b.rfcSection).toBe(section);
  });

  it("gives every behaviour a one-line summary", () => {
    for (const name of BEHAVIOR_NAMES) {
      const s = BEHAVIORS[name].summary;
      expect(s.length).toBeGreaterThan(10);
      expect(s.length).toBeLessThanOrEqual(80);
      expect(s).not.toMatch(/\n/);
    }
  });

  it("agrees with codepointOf for the plain behaviour", () => {
    for (const name of BEHAVIOR_NAMES) expect(codepointOf(name, [])).toBe(BEHAVIORS[name].baseCodepoint);
  });
});

describe("codepoints of flavoured behaviours", () => {
  // Column order of the registry tables: plain, PSP, USP, PSP&USP, USD, PSP&USD, USP&USD, PSP&USP&USD.
  const columns: Flavor[][] = [[], ["PSP"], ["USP"], ["PSP", "USP"], ["USD"], ["PSP", "USD"], ["USP", "USD"], ["PSP", "USP", "USD"]];
  const families: [BehaviorName, Flavor[], number[]][] = [
    ["End", [], [1, 2, 3, 4, 28, 29, 30, 31]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 8986 Table 6
    ["End.X", [], [5, 6, 7, 8, 32, 33, 34, 35]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 8986 Table 6
    ["End.T", [], [9, 10, 11, 12, 36, 37, 38, 39]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 8986 Table 6
    ["End", ["NEXT-CSID"], [43, 44, 45, 46, 47, 48, 49, 50]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.X", ["NEXT-CSID"], [52, 53, 54, 55, 56, 57, 58, 59]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.T", ["NEXT-CSID"], [85, 86, 87, 88, 89, 90, 91, 92]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End", ["REPLACE-CSID"], [101, 102, 103, 104, 128, 129, 130, 131]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.X", ["REPLACE-CSID"], [105, 106, 107, 108, 132, 133, 134, 135]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.T", ["REPLACE-CSID"], [109, 110, 111, 112, 136, 137, 138, 139]], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
  ];
  const familyCells: [BehaviorName, Flavor[], number][] = families.flatMap(([b, compression, cps]) =>
    cps.map((cp, i): [BehaviorName, Flavor[], number] => [b, [...columns[i]!, ...compression], cp]),
  );

  const singles: [BehaviorName, Flavor[], number][] = [
    ["End.B6.Encaps", ["NEXT-CSID"], 93], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.B6.Encaps.Red", ["NEXT-CSID"], 94], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.BM", ["NEXT-CSID"], 95], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.B6.Encaps", ["REPLACE-CSID"], 114], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.B6.Encaps.Red", ["REPLACE-CSID"], 127], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.BM", ["REPLACE-CSID"], 115], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DX6", ["REPLACE-CSID"], 116], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DX4", ["REPLACE-CSID"], 117], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DT6", ["REPLACE-CSID"], 118], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DT4", ["REPLACE-CSID"], 119], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DT46", ["REPLACE-CSID"], 120], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DX2", ["REPLACE-CSID"], 121], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DX2V", ["REPLACE-CSID"], 122], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
    ["End.DT2U", ["REPLACE-CSID"], 123], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800 (draft -04 misnamed it End.DX2U)
    ["End.DT2M", ["REPLACE-CSID"], 124], // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28); RFC 9800
  ];

  it("expands the family tables to 72 cells", () => {
    expect(familyCells).toHaveLength(72);
  });

  it.each([...familyCells, ...singles])("%s with %j is %i", (b, flavors, cp) => {
    expect(codepointOf(b, flavors)).toBe(cp);
    expect(classifyCodepoint(cp)).toEqual({ kind: "behavior", behavior: b, flavors });
  });

  it("ignores flavour order and duplicates", () => {
    expect(codepointOf("End", ["USD", "PSP"])).toBe(29); // IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28): End with PSP & USD
    expect(codepointOf("End.X", ["NEXT-CSID", "USP", "PSP", "PSP"])).toBe(55); // IANA registry (snapshot 2025-02-28): End.X with NEXT-CSID, PSP & USP
    expect(codepointOf("End.T", ["REPLACE-CSID", "REPLACE-CSID"])).toBe(109); // IANA registry (snapshot 2025-02-28): End.T with REPLACE-CSID
  });
});

describe("reference vectors (IANA)", () => {
  // Each row: IANA description as written in the registry, behaviour, flavours, codepoint.
  // Source for every row: IANA SRv6 Endpoint Behaviors registry (snapshot 2025-02-28).
  const vectors: [string, BehaviorName, Flavor[], number][] = [
    ["End", "End", [], 1], // IANA registry (snapshot 2025-02-28)
    ["End with PSP", "End", ["PSP"], 2], // IANA registry (snapshot 2025-02-28)
    ["End with USP", "End", ["USP"], 3], // IANA registry (snapshot 2025-02-28)
    ["End with PSP & USP", "End", ["PSP", "USP"], 4], // IANA registry (snapshot 2025-02-28)
    ["End.X", "End.X", [], 5], // IANA registry (snapshot 2025-02-28); RFC 8986 §3.2 example
    ["End.T", "End.T", [], 9], // IANA registry (snapshot 2025-02-28)
    ["End.B6.Encaps", "End.B6.Encaps", [], 14], // IANA registry (snapshot 2025-02-28)
    ["End.BM", "End.BM", [], 15], // IANA registry (snapshot 2025-02-28)
    ["End.DX6", "End.DX6", [], 16], // IANA registry (snapshot 2025-02-28)
    ["End.DX4", "End.DX4", [], 17], // IANA registry (snapshot 2025-02-28)
    ["End.DT6", "End.DT6", [], 18], // IANA registry (snapshot 2025-02-28)
    ["End.DT4", "End.DT4", [], 19], // IANA registry (snapshot 2025-02-28)
    ["End.DT46", "End.DT46", [], 20], // IANA registry (snapshot 2025-02-28)
    ["End.DX2", "End.DX2", [], 21], // IANA registry (snapshot 2025-02-28)
    ["End.DX2V", "End.DX2V", [], 22], // IANA registry (snapshot 2025-02-28)
    ["End.DT2U", "End.DT2U", [], 23], // IANA registry (snapshot 2025-02-28)
    ["End.DT2M", "End.DT2M", [], 24], // IANA registry (snapshot 2025-02-28)
    ["End.B6.Encaps.Red", "End.B6.Encaps.Red", [], 27], // IANA registry (snapshot 2025-02-28)
    ["End with USD", "End", ["USD"], 28], // IANA registry (snapshot 2025-02-28)
    ["End with PSP, USP & USD", "End", ["PSP", "USP", "USD"], 31], // IANA registry (snapshot 2025-02-28)
    ["End.X with PSP, USP & USD", "End.X", ["PSP", "USP", "USD"], 35], // IANA registry (snapshot 2025-02-28)
    ["End.T with PSP, USP & USD", "End.T", ["PSP", "USP", "USD"], 39], // IANA registry (snapshot 2025-02-28)
    ["End with NEXT-CSID", "End", ["NEXT-CSID"], 43], // IANA registry (snapshot 2025-02-28)
    ["End.X with NEXT-CSID", "End.X", ["NEXT-CSID"], 52], // IANA registry (snapshot 2025-02-28)
    ["End.T with NEXT-CSID", "End.T", ["NEXT-CSID"], 85], // IANA registry (snapshot 2025-02-28)
    ["End with REPLACE-CSID", "End", ["REPLACE-CSID"], 101], // IANA registry (snapshot 2025-02-28)
    ["End.X with REPLACE-CSID", "End.X", ["REPLACE-CSID"], 105], // IANA registry (snapshot 2025-02-28)
    ["End.DT46 with REPLACE-CSID", "End.DT46", ["REPLACE-CSID"], 120], // IANA registry (snapshot 2025-02-28)
    ["End.DT2M with REPLACE-CSID", "End.DT2M", ["REPLACE-CSID"], 124], // IANA registry (snapshot 2025-02-28)
  ];

  it.each(vectors)("%s -> %i", (_description, b, flavors, cp) => {
    expect(codepointOf(b, flavors)).toBe(cp);
    expect(classifyCodepoint(cp)).toEqual({ kind: "behavior", behavior: b, flavors });
  });

  it("classifies the range vectors", () => {
    expect(classifyCodepoint(65535)).toEqual({ kind: "opaque" }); // IANA registry (snapshot 2025-02-28): 65535 Opaque
    expect(classifyCodepoint(0)).toEqual({ kind: "reserved" }); // IANA registry (snapshot 2025-02-28): 0 Reserved
    expect(classifyCodepoint(33000)).toEqual({ kind: "private-use" }); // IANA registry (snapshot 2025-02-28): 32768-34815 Private Use
  });
});

describe("classifyCodepoint", () => {
  it.each([
    [0, { kind: "reserved" }], // RFC 8986 §10.2.1; IANA registry (snapshot 2025-02-28): 0 not to be allocated
    [25, { kind: "reserved" }], // IANA registry (snapshot 2025-02-28): 25 registered as Reserved
    [32768, { kind: "private-use" }], // RFC 8986 §10.2.1: first Private Use value (0x8000)
    [33000, { kind: "private-use" }], // RFC 8986 §10.2.1: inside 32768-34815
    [34815, { kind: "private-use" }], // RFC 8986 §10.2.1: last Private Use value (0x87FF)
    [34816, { kind: "reserved" }], // RFC 8986 §10.2.1: first of 34816-65534 Reserved
    [65534, { kind: "reserved" }], // RFC 8986 §10.2.1: last of 34816-65534 Reserved
    [65535, { kind: "opaque" }], // RFC 8986 §10.2.1, §8.3: Opaque
    [98, { kind: "unassigned" }], // IANA registry (snapshot 2025-02-28): 98-99 unassigned
    [99, { kind: "unassigned" }], // IANA registry (snapshot 2025-02-28): 98-99 unassigned
    [113, { kind: "unassigned" }], // IANA registry (snapshot 2025-02-28): 113 unassigned
    [125, { kind: "unassigned" }], // IANA registry (snapshot 2025-02-28): 125-126 unassigned
    [126, { kind: "unassigned" }], // IANA registry (snapshot 2025-02-28): 125-126 unassigned
    [32766, { kind: "unassigned" }], // not in the IANA registry snapshot 2025-02-28 (FCFS range, RFC 8986 §10.2.1)
  ])("%i is %j", (cp, expected) => {
    expect(classifyCodepoint(cp)).toEqual(expected);
  });

  it.each([
    [13, "End.B6.Insert"], // IANA registry (snapshot 2025-02-28), individual draft
    [26, "End.B6.Insert.Red"], // IANA registry (snapshot 2025-02-28), individual draft
    [40, "End.MAP"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [41, "End.Limit"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [42, "End with NEXT-ONLY-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [51, "End.X with NEXT-ONLY-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [60, "End.DX6 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft, not RFC 9800
    [61, "End.DX4 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [62, "End.DT6 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [63, "End.DT4 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [64, "End.DT46 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [65, "End.DX2 with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [66, "End.DX2V with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [67, "End.DT2U with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [68, "End.DT2M with NEXT-CSID"], // IANA registry (snapshot 2025-02-28), individual draft
    [69, "End.M.GTP6.D"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [70, "End.M.GTP6.Di"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [71, "End.M.GTP6.E"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [72, "End.M.GTP4.E"], // IANA registry (snapshot 2025-02-28); RFC 9433
    [75, "End.Replicate"], // IANA registry (snapshot 2025-02-28); RFC 9524
    [84, "End.NSH"], // IANA registry (snapshot 2025-02-28); RFC 9491
    [96, "End.LBS with NEXT-CSID"], // IANA registry (snapshot 2025-02-28); RFC 9800 §7
    [97, "End.XLBS with NEXT-CSID"], // IANA registry (snapshot 2025-02-28); RFC 9800 §7
    [140, "End.LBS with REPLACE-CSID"], // IANA registry (snapshot 2025-02-28); RFC 9800 §7
    [141, "End.XLBS with REPLACE-CSID"], // IANA registry (snapshot 2025-02-28); RFC 9800 §7
    [32767, "The SID defined in RFC 8754"], // IANA registry (snapshot 2025-02-28)
  ])("%i is registered as %s", (cp, name) => {
    expect(classifyCodepoint(cp)).toEqual({ kind: "other-registered", name });
  });

  it("treats values missing from our reference as unassigned (documented limit, not a registry fact)", () => {
    // 73, 74 and 76-83 are not listed in our reference; the module documents that it cannot know them.
    for (const cp of [73, 74, 76, 83]) expect(classifyCodepoint(cp)).toEqual({ kind: "unassigned" });
  });

  it.each([-1, 65536, 1.5, Number.NaN, Number.POSITIVE_INFINITY])("throws RangeError for %s", (cp) => {
    expect(() => classifyCodepoint(cp)).toThrow(RangeError);
  });

  it("returns a fresh flavour array each call", () => {
    const first = classifyCodepoint(4);
    if (first.kind !== "behavior") throw new Error("expected a behaviour");
    first.flavors.push("USD");
    expect(classifyCodepoint(4)).toEqual({ kind: "behavior", behavior: "End", flavors: ["PSP", "USP"] }); // IANA registry: 4 End with PSP & USP
  });
});

describe("round trip over every legal combination", () => {
  const legal: [BehaviorName, Flavor[]][] = [];
  for (const b of BEHAVIOR_NAMES) for (const f of allFlavorSubsets()) if (flavorProblem(b, f) === undefined) legal.push([b, f]);

  it("finds 99 legal combinations", () => {
    // End/End.X/End.T: 8 PSP/USP/USD subsets x {none, NEXT, REPLACE} = 72 (RFC 8986 §4.16, RFC 9800);
    // End.B6.Encaps/.Red/End.BM: none, NEXT, REPLACE = 9; nine services: none, REPLACE = 18.
    expect(legal).toHaveLength(99);
  });

  it("maps each legal combination to a codepoint that classifies back to it", () => {
    for (const [b, f] of legal) {
      const cp = codepointOf(b, f);
      expect(cp, `${b} ${f.join("+")}`).toBeTypeOf("number");
      expect(classifyCodepoint(cp!)).toEqual({ kind: "behavior", behavior: b, flavors: normalizeFlavors(f) });
    }
  });

  it("gives no two combinations the same codepoint", () => {
    const cps = legal.map(([b, f]) => codepointOf(b, f));
    expect(new Set(cps).size).toBe(legal.length);
  });

  it("has no codepoint for any illegal combination", () => {
    for (const b of BEHAVIOR_NAMES) {
      for (const f of allFlavorSubsets()) {
        if (flavorProblem(b, f) !== undefined) expect(codepointOf(b, f), `${b} ${f.join("+")}`).toBeUndefined();
      }
    }
  });
});

describe("flavorProblem", () => {
  it.each<[BehaviorName, Flavor[]]>([
    ["End", []], // RFC 8986 §4.1: plain behaviour
    ["End", ["PSP", "USP", "USD", "NEXT-CSID"]], // IANA registry (snapshot 2025-02-28): 50
    ["End.X", ["USD", "REPLACE-CSID"]], // IANA registry (snapshot 2025-02-28): 132
    ["End.T", ["PSP"]], // RFC 8986 §4.16: flavours apply to End.T
    ["End.DT4", []], // plain End.DT4, also the right choice in a NEXT-CSID domain (RFC 9800 §4.1)
    ["End.DT4", ["REPLACE-CSID"]], // IANA registry (snapshot 2025-02-28): 119
    ["End.BM", ["NEXT-CSID"]], // IANA registry (snapshot 2025-02-28): 95
    ["End.B6.Encaps.Red", ["REPLACE-CSID"]], // IANA registry (snapshot 2025-02-28): 127
  ])("%s with %j is legal", (b, f) => {
    expect(flavorProblem(b, f)).toBeUndefined();
  });

  it("rejects PSP on End.DT4 and says what is allowed", () => {
    // RFC 8986 §4.16: PSP/USP/USD apply only to End, End.X and End.T
    const msg = flavorProblem("End.DT4", ["PSP"]);
    expect(msg).toBeTypeOf("string");
    expect(msg).toContain('"PSP"');
    expect(msg).toContain('"End.DT4"');
    expect(msg).toContain("RFC 8986 §4.16");
    expect(msg).toContain('"REPLACE-CSID"');
  });

  it("rejects USD on End.BM", () => {
    // RFC 8986 §4.16
    const msg = flavorProblem("End.BM", ["USD"]);
    expect(msg).toContain('"USD"');
    expect(msg).toContain('"End.BM"');
    expect(msg).toContain('"NEXT-CSID"'); // allowed for End.BM: IANA registry (snapshot 2025-02-28) 95
  });

  it("rejects USP on the L2 behaviours", () => {
    // RFC 8986 §4.16
    for (const b of ["End.DX2", "End.DX2V", "End.DT2U", "End.DT2M"] as const) expect(flavorProblem(b, ["USP"])).toContain('"USP"');
  });

  it("rejects NEXT-CSID together with REPLACE-CSID", () => {
    // IANA registry (snapshot 2025-02-28) has no codepoint with both flavours
    for (const b of ["End", "End.X", "End.BM", "End.DT4"] as const) {
      const msg = flavorProblem(b, ["NEXT-CSID", "REPLACE-CSID"]);
      expect(msg).toContain('"NEXT-CSID"');
      expect(msg).toContain('"REPLACE-CSID"');
    }
  });

  it("rejects NEXT-CSID on the services and points to the plain behaviour", () => {
    // RFC 9800 registers no NEXT-CSID variant of End.DX*/End.DT* (60-68 belong to an individual draft)
    const msg = flavorProblem("End.DT4", ["NEXT-CSID"]);
    expect(msg).toContain('"NEXT-CSID"');
    expect(msg).toContain("RFC 9800");
    expect(msg).toContain("without the flavour");
    expect(msg).toContain("codepoint 19"); // IANA registry (snapshot 2025-02-28): End.DT4
    for (const b of ["End.DX6", "End.DX4", "End.DT6", "End.DT46", "End.DX2", "End.DX2V", "End.DT2U", "End.DT2M"] as const) {
      expect(flavorProblem(b, ["NEXT-CSID"])).toContain("without the flavour");
      expect(codepointOf(b, ["NEXT-CSID"])).toBeUndefined();
    }
  });

  it("reports unknown values from untyped callers", () => {
    expect(flavorProblem("End", ["FOO" as Flavor])).toContain('"FOO"');
    expect(codepointOf("End", ["FOO" as Flavor])).toBeUndefined();
    expect(flavorProblem("End.Bogus" as BehaviorName, [])).toContain('"End.Bogus"');
  });
});

describe("parseFlavor and normalizeFlavors", () => {
  it.each<[string, Flavor]>([
    ["psp", "PSP"],
    ["PSP", "PSP"],
    ["Psp", "PSP"],
    ["usp", "USP"],
    ["usd", "USD"],
    ["USD", "USD"],
    ["next-csid", "NEXT-CSID"], // RFC 9800 spelling
    ["NEXT-CSID", "NEXT-CSID"],
    ["next-c-sid", "NEXT-CSID"], // spelling of the RFC 9800 drafts up to -04
    ["Next-C-Sid", "NEXT-CSID"],
    ["replace-csid", "REPLACE-CSID"], // RFC 9800 spelling
    ["REPLACE-C-SID", "REPLACE-CSID"], // spelling of the RFC 9800 drafts up to -04
  ])("parses %j as %s", (s, f) => {
    expect(parseFlavor(s)).toBe(f);
  });

  it.each(["", " psp", "psp ", "next", "nextcsid", "next_csid", "csid", "PSP,USP", "toString"])("rejects %j", (s) => {
    expect(parseFlavor(s)).toBeUndefined();
  });

  it("deduplicates and sorts by FLAVOR_ORDER", () => {
    expect(normalizeFlavors([])).toEqual([]);
    expect(normalizeFlavors(["REPLACE-CSID", "USD", "PSP", "USD"])).toEqual(["PSP", "USD", "REPLACE-CSID"]);
    expect(normalizeFlavors(["NEXT-CSID", "USP", "PSP"])).toEqual(["PSP", "USP", "NEXT-CSID"]);
  });

  it("does not modify its input", () => {
    const input: Flavor[] = ["USD", "PSP"];
    normalizeFlavors(input);
    expect(input).toEqual(["USD", "PSP"]);
  });
});
