/**
 * Allocator tests: the RFC worked examples, stability across runs, retirement, refusal to
 * renumber, growth by a whole region, and the compressed layouts.
 */
import { describe, expect, it } from "vitest";
import { allocate } from "../../src/alloc/allocate.js";
import { parseLock, serializeLock } from "../../src/alloc/lock.js";
import { formatAddr } from "../../src/net/text.js";
import { alloc, basePlan, planFrom, sidRows } from "../helpers/plans.js";

const sidsOf = (a: ReturnType<typeof alloc>, node: string) => a.table.nodes.find((n) => n.node === node)!.sids;
const roundTrip = (a: ReturnType<typeof alloc>, name = "test") => {
  const r = parseLock(serializeLock(a.lock), "x.lock.json", name);
  if (!r.ok) throw new Error(r.diagnostics[0]!.message);
  return r.lock;
};

describe("RFC 8986 §3.2 worked example", () => {
  // RFC 8986 §3.2: block 2001:db8:bbbb::/48, Router 3 gets 2001:db8:bbbb:3::/64; End.X function
  // 0x0100 (F=16, A=0) towards Router 4 is SID 2001:db8:bbbb:3:100:: with codepoint 5, and
  // function 0x0101 towards Router 2 is 2001:db8:bbbb:3:101::.
  const plan = planFrom({
    sidcarve: 1,
    plan: "rfc8986",
    levels: [{ name: "router", bits: 16 }],
    blocks: [{ name: "b", prefix: "2001:db8:bbbb::/48", structure: { node: 16, function: 16, argument: 0 } }],
    nodes: [
      { name: "router2", value: 2 },
      { name: "router3", value: 3 },
      { name: "router4", value: 4 },
    ],
    links: [
      { ends: [{ node: "router3", function: "0x0100" }, "router4"] },
      { ends: [{ node: "router3", function: "0x0101" }, "router2"] },
    ],
  });
  const a = alloc(plan);
  const r3 = a.table.nodes.find((n) => n.node === "router3")!;

  it("carves Router 3's locator", () => {
    expect(r3.locators.map((l) => l.prefix.format())).toEqual(["2001:db8:bbbb:3::/64"]); // RFC 8986 §3.2
  });
  it("gives the End.X SIDs of the example with codepoint 5", () => {
    const endx = r3.sids.filter((s) => s.behavior === "End.X");
    const byNeighbor = Object.fromEntries(endx.map((s) => [s.context.neighbor, s]));
    expect(formatAddr(byNeighbor.router4!.sid)).toBe("2001:db8:bbbb:3:100::"); // RFC 8986 §3.2
    expect(formatAddr(byNeighbor.router2!.sid)).toBe("2001:db8:bbbb:3:101::"); // RFC 8986 §3.2
    expect(endx.every((s) => s.codepoint === 5)).toBe(true); // RFC 8986 §3.2; IANA End.X = 5
    expect(byNeighbor.router4!.structure).toEqual({ block: 48, node: 16, function: 16, argument: 0 }); // F=16, A=0
  });
  it("counts 65536 /64 locators in a /48 block (RFC 8986 §3.2, derived)", () => {
    expect(plan.levels[0]!.bits).toBe(16);
    expect(2 ** (64 - 48)).toBe(65536);
  });
});

describe("RFC 9800 §5.3 / §8 compressed examples", () => {
  it("NEXT-CSID: global End C-SID and combined global+local End.X", () => {
    // RFC 9800 §5.3: 2001:db8:b1:10:: End with NEXT-CSID, LBL 48, LNL 16, FL 0, AL 64;
    // §8: combined 2001:db8:b1:10:f123:: with LBL 48, LNL 16, FL 16, AL 48.
    const plan = planFrom({
      sidcarve: 1,
      plan: "rfc9800-next",
      levels: [{ name: "router", bits: 16 }],
      blocks: [{ name: "b1", prefix: "2001:db8:b1::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xefff"], "local-pool": ["0xf000-0xffff"] } }],
      nodes: [{ name: "n10", value: "0x10" }, { name: "n11", value: "0x11" }],
      links: [{ ends: [{ node: "n10", function: "0xf123" }, "n11"] }],
    });
    const s = sidsOf(alloc(plan), "n10");
    const end = s.find((x) => x.behavior === "End")!;
    expect(formatAddr(end.sid)).toBe("2001:db8:b1:10::"); // RFC 9800 §5.3
    expect(end.structure).toEqual({ block: 48, node: 16, function: 0, argument: 64 }); // RFC 9800 §5.3
    expect(end.codepoint).toBe(43); // IANA: End with NEXT-CSID
    const x = s.find((y) => y.behavior === "End.X")!;
    expect(formatAddr(x.sid)).toBe("2001:db8:b1:10:f123::"); // RFC 9800 §8 combined global+local
    expect(x.structure).toEqual({ block: 48, node: 16, function: 16, argument: 48 }); // RFC 9800 §8
    expect(x.codepoint).toBe(52); // IANA: End.X with NEXT-CSID
  });

  it("REPLACE-CSID: node and function in one 32-bit C-SID", () => {
    // RFC 9800 §5.3: 2001:db8:b2:20:1:: End with REPLACE-CSID and 2001:db8:b2:20:123:: End.X with
    // REPLACE-CSID, both LBL 48, LNL 16, FL 16, AL 48.
    const plan = planFrom({
      sidcarve: 1,
      plan: "rfc9800-replace",
      levels: [{ name: "router", bits: 16 }],
      blocks: [{ name: "b2", prefix: "2001:db8:b2::/48", compression: { flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xffffffff"] } }],
      "function-pools": { end: ["1-15"] },
      nodes: [{ name: "n20", value: "0x20" }, { name: "n21", value: "0x21" }],
      links: [{ ends: [{ node: "n20", function: "0x123" }, "n21"] }],
    });
    const s = sidsOf(alloc(plan), "n20");
    const end = s.find((x) => x.behavior === "End")!;
    expect(formatAddr(end.sid)).toBe("2001:db8:b2:20:1::"); // RFC 9800 §5.3
    expect(end.structure).toEqual({ block: 48, node: 16, function: 16, argument: 48 }); // RFC 9800 §5.3
    expect(end.codepoint).toBe(101); // IANA: End with REPLACE-CSID
    const x = s.find((y) => y.behavior === "End.X")!;
    expect(formatAddr(x.sid)).toBe("2001:db8:b2:20:123::"); // RFC 9800 §5.3
    expect(x.codepoint).toBe(105); // IANA: End.X with REPLACE-CSID
  });

  it("never hands out C-SID value 0 or a node value outside the global pool", () => {
    // RFC 9800 §5: C-SID value 0 is reserved. The pool here excludes 0x0000-0x0002.
    const plan = planFrom({
      sidcarve: 1,
      plan: "gib",
      levels: [{ name: "router", bits: 16 }],
      blocks: [{ name: "b", prefix: "5f00:10::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0003-0x0005"], "local-pool": ["0xf000-0xffff"] } }],
      nodes: [{ name: "a" }, { name: "b" }, { name: "c" }],
    });
    const a = alloc(plan);
    expect([...a.nodeValues.values()].sort()).toEqual([3n, 4n, 5n]);
    const more = planFrom({ sidcarve: 1, plan: "gib", levels: [{ name: "router", bits: 16 }], blocks: [{ name: "b", prefix: "5f00:10::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0003-0x0005"], "local-pool": ["0xf000-0xffff"] } }], nodes: [{ name: "a" }, { name: "b" }, { name: "c" }, { name: "d" }] });
    const r = allocate(more, undefined);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.diagnostics[0]!.code).toBe("alloc/level-full");
  });
});

describe("stability across runs", () => {
  const plan = planFrom(basePlan({ vrfs: [{ name: "blue", pes: ["r1", "r4"], families: ["ipv4"] }] }));
  const first = alloc(plan);

  it("is idempotent: allocating again with the lock changes nothing", () => {
    const again = alloc(plan, roundTrip(first));
    expect(serializeLock(again.lock)).toBe(serializeLock(first.lock));
    expect(again.added).toBe(0);
    expect(sidRows(again)).toEqual(sidRows(first));
  });

  it("adding routers, links and VRFs changes no existing SID", () => {
    const grown = planFrom(
      basePlan({
        nodes: [
          { name: "r0", place: "north/quay" }, // listed first, but new
          { name: "r1", place: "north/quay" },
          { name: "r2", place: "north/quay" },
          { name: "r3", place: "north/mill" },
          { name: "r4", place: "south/dock" },
          { name: "r5", place: "south/dock" },
        ],
        links: [{ ends: ["r0", "r1"] }, { ends: ["r1", "r2"] }, { ends: ["r2", "r3"] }, { ends: ["r3", "r4"] }, { ends: ["r4", "r5"] }],
        vrfs: [
          { name: "blue", pes: ["r1", "r4", "r5"], families: ["ipv4"] },
          { name: "green", pes: ["r1"], families: ["ipv6"] },
        ],
      }),
    );
    const b = alloc(grown, roundTrip(first));
    const after = new Set(sidRows(b));
    for (const row of sidRows(first)) expect(after.has(row)).toBe(true);
    expect(b.added).toBeGreaterThan(0);
  });

  it("adding a whole region leaves every existing region untouched", () => {
    const grown = planFrom(
      basePlan({
        groups: { east: { groups: { ford: {} } }, north: { groups: { quay: {}, mill: {} } }, south: { groups: { dock: {} } } },
        nodes: [
          { name: "r1", place: "north/quay" },
          { name: "r2", place: "north/quay" },
          { name: "r3", place: "north/mill" },
          { name: "r4", place: "south/dock" },
          { name: "e1", place: "east/ford" },
        ],
        vrfs: [{ name: "blue", pes: ["r1", "r4"], families: ["ipv4"] }],
      }),
    );
    const b = alloc(grown, roundTrip(first));
    for (const g of ["north", "south", "north/quay", "north/mill", "south/dock"]) expect(b.groupValues.get(g)).toBe(first.groupValues.get(g));
    const used = new Set([first.groupValues.get("north"), first.groupValues.get("south")]);
    expect(used.has(b.groupValues.get("east"))).toBe(false);
    const after = new Set(sidRows(b));
    for (const row of sidRows(first)) expect(after.has(row)).toBe(true);
  });

  it("retires the values of removed items and never reuses them", () => {
    const shrunk = planFrom(basePlan({ nodes: [{ name: "r1", place: "north/quay" }, { name: "r3", place: "north/mill" }, { name: "r4", place: "south/dock" }], links: [{ ends: ["r3", "r4"] }] }));
    const b = alloc(shrunk, roundTrip(first));
    const r2value = first.nodeValues.get("r2")!;
    expect(b.lock.retired.some((r) => r.kind === "node" && r.was === "r2")).toBe(true);
    const regrown = planFrom(basePlan({ nodes: [{ name: "r1", place: "north/quay" }, { name: "r9", place: "north/quay" }, { name: "r3", place: "north/mill" }, { name: "r4", place: "south/dock" }], links: [] }));
    const c = alloc(regrown, roundTrip(b));
    expect(c.nodeValues.get("r9")).not.toBe(r2value);
    // the removed End.X of r1 towards r2 is retired on r1's locator
    expect(b.lock.retired.some((r) => r.kind === "function" && r.space.startsWith("r1|") && r.was.includes("End.X|r2"))).toBe(true);
  });

  it("refuses an edit that moves a node to another site, and says what would move", () => {
    const moved = planFrom(basePlan({ nodes: [{ name: "r1", place: "south/dock" }, { name: "r2", place: "north/quay" }, { name: "r3", place: "north/mill" }, { name: "r4", place: "south/dock" }] }));
    const r = allocate(moved, roundTrip(first));
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.moves.map((m) => m.what)).toContain("node r1");
      expect(r.moves[0]!.reason).toMatch(/north\/quay/);
    }
    const allowed = alloc(moved, roundTrip(first), true);
    expect(allowed.lock.retired.some((x) => x.kind === "node" && x.was === "r1" && x.space === "north/quay")).toBe(true);
    expect(allowed.table.nodes.find((n) => n.node === "r1")!.locators[0]!.prefix.format()).not.toBe(first.table.nodes.find((n) => n.node === "r1")!.locators[0]!.prefix.format());
  });

  it("refuses a changed block prefix unless renumbering is allowed", () => {
    const other = planFrom(basePlan({ blocks: [{ name: "b", prefix: "5f00:0:200::/48", structure: { node: 16, function: 16, argument: 0 } }] }));
    const r = allocate(other, roundTrip(first));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.moves[0]!.what).toBe("every locator");
    expect(allocate(other, roundTrip(first), { allowRenumber: true }).ok).toBe(true);
  });

  it("keeps pinned values and refuses a changed pin", () => {
    const pinned = planFrom(basePlan({ nodes: [{ name: "r1", place: "north/quay", value: 200 }, { name: "r2", place: "north/quay" }, { name: "r3", place: "north/mill" }, { name: "r4", place: "south/dock" }] }));
    const a = alloc(pinned);
    expect(a.nodeValues.get("r1")! & 0xffn).toBe(200n);
    const repinned = planFrom(basePlan({ nodes: [{ name: "r1", place: "north/quay", value: 201 }, { name: "r2", place: "north/quay" }, { name: "r3", place: "north/mill" }, { name: "r4", place: "south/dock" }] }));
    const r = allocate(repinned, roundTrip(a));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.moves[0]!.from).toBe("0xc8");
  });
});

describe("levels follow RFC 3531 orders", () => {
  it("hands region values leftmost-first and router values rightmost-first", () => {
    const plan = planFrom(
      basePlan({
        levels: [
          { name: "region", bits: 4, order: "leftmost", reserved: [0] },
          { name: "site", bits: 4, order: "centremost" },
          { name: "router", bits: 8, order: "rightmost", reserved: [0] },
        ],
        groups: { a: { groups: { s1: {}, s2: {}, s3: {} } }, b: { groups: { s1: {} } }, c: { groups: { s1: {} } } },
        nodes: [{ name: "x1", place: "a/s1" }, { name: "x2", place: "a/s1" }],
        links: [],
      }),
    );
    const a = alloc(plan);
    // RFC 3531 §3 leftmost order for 4 bits: 0000, 1000, 0100, 1100 (0 reserved here)
    expect([a.groupValues.get("a"), a.groupValues.get("b"), a.groupValues.get("c")]).toEqual([8n, 4n, 12n]);
    // centremost 4 bits: start just after the centre (0010), then the bit before (0100): 0, 2, 4, 6
    expect([a.groupValues.get("a/s1"), a.groupValues.get("a/s2"), a.groupValues.get("a/s3")]).toEqual([0n, 2n, 4n]);
    expect([a.nodeValues.get("x1")! & 0xffn, a.nodeValues.get("x2")! & 0xffn]).toEqual([1n, 2n]);
  });
});

describe("Flex-Algo locators", () => {
  it("gives one locator per algorithm from distinct node-field values (algorithm bits)", () => {
    const plan = planFrom({
      sidcarve: 1,
      plan: "fa",
      algorithms: [{ id: 0 }, { id: 128, name: "low-delay" }],
      levels: [{ name: "router", bits: 15 }],
      blocks: [{ name: "b", prefix: "5f00:0:300::/48", algorithms: [0, 128], structure: { node: 16, function: 16 } }],
      nodes: [{ name: "a" }, { name: "b" }],
      links: [{ ends: ["a", "b"] }],
    });
    const a = alloc(plan).table.nodes.find((n) => n.node === "a")!;
    expect(a.locators.map((l) => `${l.algorithm} ${l.prefix.format()}`)).toEqual(["0 5f00:0:300::/64", "128 5f00:0:300:8000::/64"]);
    // every algorithm gets its own End and End.X SIDs (RFC 9350 §14.2)
    for (const algo of [0, 128]) {
      expect(a.sids.some((s) => s.algorithm === algo && s.behavior === "End")).toBe(true);
      expect(a.sids.some((s) => s.algorithm === algo && s.behavior === "End.X")).toBe(true);
    }
  });

  it("takes Flex-Algo locators from a separate block", () => {
    const plan = planFrom({
      sidcarve: 1,
      plan: "fa2",
      algorithms: [{ id: 0 }, { id: 128 }],
      levels: [{ name: "router", bits: 16 }],
      blocks: [
        { name: "base", prefix: "5f00:0:400::/48", algorithms: [0], structure: { node: 16, function: 16 } },
        { name: "fa128", prefix: "5f00:0:401::/48", algorithms: [128], structure: { node: 16, function: 16 } },
      ],
      nodes: [{ name: "a" }],
    });
    const a = alloc(plan).table.nodes[0]!;
    expect(a.locators.map((l) => `${l.block} ${l.prefix.format()}`)).toEqual(["base 5f00:0:400::/64", "fa128 5f00:0:401::/64"]);
  });
});

describe("services", () => {
  it("gives End.DT4/DT6/DT46 per VRF, End.DX4 per CE, L2 and binding SIDs with their codepoints", () => {
    const plan = planFrom(
      basePlan({
        blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 16, function: 16, argument: 8 } }],
        vrfs: [
          { name: "v46", pes: ["r1"] },
          { name: "vsplit", pes: ["r1"], mode: "split" },
          { name: "vce", pes: ["r1"], families: ["ipv4"], ces: [{ name: "ce1", pe: "r1", family: "ipv4" }] },
        ],
        "l2-services": [
          { name: "w", kind: "wire", attachments: [{ node: "r1", interface: "p1" }] },
          { name: "br", kind: "bridge", nodes: ["r1"] },
        ],
        policies: [{ name: "to-r4", node: "r1", behavior: "End.B6.Encaps.Red" }],
        tables: [{ name: "mgmt", nodes: ["r1"] }],
      }),
    );
    const s = sidsOf(alloc(plan), "r1");
    const cp = (b: string) => s.filter((x) => x.behavior === b).map((x) => x.codepoint);
    // IANA SRV6 Endpoint Behaviors: DT46 20, DT4 19, DT6 18, DX4 17, DX2 21, DT2U 23, DT2M 24, B6.Encaps.Red 27, End.T 9
    expect(cp("End.DT46")).toEqual([20]);
    expect(cp("End.DT4").sort()).toEqual([19, 19]);
    expect(cp("End.DT6")).toEqual([18]);
    expect(cp("End.DX4")).toEqual([17]);
    expect(cp("End.DX2")).toEqual([21]);
    expect(cp("End.DT2U")).toEqual([23]);
    expect(cp("End.DT2M")).toEqual([24]);
    expect(cp("End.B6.Encaps.Red")).toEqual([27]);
    expect(cp("End.T")).toEqual([9]);
    // only End.DT2M carries argument bits (RFC 8986 §4.12)
    for (const x of s) expect(x.structure!.argument).toBe(x.behavior === "End.DT2M" ? 8 : 0);
  });
});

describe("refusals that keep a plan honest", () => {
  const nextBlock = (extra: Record<string, unknown> = {}) => ({ name: "b", prefix: "5f00:20::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0100-0xbfff"], "local-pool": ["0xc000-0xfeff"], ...extra } });
  const codes = (obj: Record<string, unknown>) => {
    const r = allocate(planFrom(obj), undefined);
    return r.ok ? [] : r.diagnostics.map((d) => d.code);
  };
  it("refuses a pinned local C-SID of 0 or outside the LIB (RFC 9800 §5)", () => {
    for (const fn of [0, "0x0005"]) {
      expect(codes({ sidcarve: 1, plan: "p", levels: [{ name: "router", bits: 16 }], blocks: [nextBlock()], nodes: [{ name: "a", value: "0x200" }, { name: "b", value: "0x201" }], links: [{ ends: [{ node: "a", function: fn }, "b"] }] })).toEqual(["alloc/pin"]);
    }
  });
  it("refuses a pinned node value whose C-SID falls outside the GIB (RFC 9800 §5)", () => {
    expect(codes({ sidcarve: 1, plan: "p", levels: [{ name: "router", bits: 16 }], blocks: [nextBlock()], nodes: [{ name: "a", value: "0xc001" }] })).toEqual(["alloc/pin"]);
  });
  it("refuses a VRF on an algorithm its PE does not run", () => {
    const obj = basePlan({ algorithms: [{ id: 0 }, { id: 128 }], nodes: [{ name: "r1", place: "north/quay", algorithms: [0] }, { name: "r2", place: "north/quay", algorithms: [0] }, { name: "r3", place: "north/mill", algorithms: [0] }, { name: "r4", place: "south/dock", algorithms: [0] }], vrfs: [{ name: "fast", pes: ["r1"], algorithm: 128 }] });
    expect(codes(obj)).toEqual(["alloc/algorithm"]);
  });
  it("refuses a link whose algorithms one end does not run, once per end and missing algorithm", () => {
    const obj = basePlan({
      algorithms: [{ id: 0 }, { id: 128 }, { id: 129 }],
      nodes: [{ name: "r1", place: "north/quay", algorithms: [0] }, { name: "r2", place: "north/quay", algorithms: [0, 128, 129] }, { name: "r3", place: "north/mill", algorithms: [0] }, { name: "r4", place: "south/dock", algorithms: [0] }],
      links: [{ ends: ["r1", "r2"], algorithms: [0, 128, 129], protection: "both" }],
    });
    const r = allocate(planFrom(obj), undefined);
    expect(r.ok).toBe(false);
    const msgs = r.ok ? [] : r.diagnostics.map((d) => `${d.code} ${/on (\w+) uses algorithm (\d+)/.exec(d.message)?.slice(1).join(" ")}`);
    // r1 lacks 128 and 129, for each of its two End.X SIDs (unprotected, protected); r2 runs all three
    expect(msgs).toEqual(["alloc/algorithm r1 128", "alloc/algorithm r1 129", "alloc/algorithm r1 128", "alloc/algorithm r1 129"]);
  });
});

describe("compressed layout defaults", () => {
  it("REPLACE-CSID with 32-bit C-SIDs splits node and function 16 + 16 by default (RFC 9800 §6.4: LNFL 32)", () => {
    const plan = planFrom({ sidcarve: 1, plan: "r", levels: [{ name: "router", bits: 16 }], blocks: [{ name: "b", prefix: "5f00:30::/32", compression: { flavor: "replace-csid", "csid-bits": 32, "global-pool": ["0x00010000-0xffffffff"] } }], "function-pools": { end: ["1-15"] }, nodes: [{ name: "a" }] });
    const layout = plan.blocks[0]!.layout;
    expect(layout.kind === "compressed" && [layout.nodeBits, layout.functionBits]).toEqual([16, 16]);
  });
  it("counts a NEXT-CSID block's argument bits in the 128-bit budget (RFC 8986 §3.1)", () => {
    expect(() => planFrom({ sidcarve: 1, plan: "r", levels: [{ name: "router", bits: 16 }], blocks: [{ name: "b", prefix: "5f00:0:100::/96", compression: { flavor: "next-csid", "csid-bits": 16, argument: 16, "global-pool": ["1-0xbfff"], "local-pool": ["0xc000-0xffff"] } }], nodes: [{ name: "a" }] })).toThrow(/plan\/structure/);
  });
});
