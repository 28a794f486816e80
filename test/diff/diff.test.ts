/**
 * The table diff: every expectation comes from the edit the test makes (a node added, a PE
 * dropped from a VRF, a router moved, a flavour changed, a row rewritten), and the SIDs it should
 * name are taken from the allocations themselves, not from the diff's own output.
 */
import { describe, expect, it } from "vitest";
import type { Allocation } from "../../src/alloc/allocate.js";
import { bindingOf, diffExitCode, diffTables } from "../../src/diff/diff.js";
import { diffText } from "../../src/diff/render.js";
import { tableToCsv } from "../../src/emit/csv.js";
import { tableToJson } from "../../src/emit/json.js";
import { formatAddr } from "../../src/net/text.js";
import type { SidEntry, SidTable } from "../../src/sid/table.js";
import { readCsvTable, readJsonTable } from "../../src/sid/table-read.js";
import { alloc, basePlan, planFrom } from "../helpers/plans.js";

const withServices = (extra: Record<string, unknown> = {}) =>
  basePlan({
    "end-sids": [{ flavors: [] }, { flavors: ["PSP", "USD"] }],
    "adjacency-flavors": ["PSP"],
    vrfs: [
      { name: "tills", families: ["ipv4"], pes: ["r1", "r4"] },
      { name: "gates", families: ["ipv4", "ipv6"], mode: "split", pes: ["r2"] },
    ],
    ...extra,
  });

function allocOf(obj: Record<string, unknown>, prev?: Allocation, allowRenumber = false): Allocation {
  return alloc(planFrom(obj), prev?.lock, allowRenumber);
}

const sidsOf = (t: SidTable, node: string) => t.nodes.find((n) => n.node === node)?.sids ?? [];
const addrs = (ss: readonly (SidEntry | undefined)[]) => ss.map((s) => formatAddr(s!.sid)).sort();

/** A copy of a table with one node's SIDs rewritten. */
function editSids(t: SidTable, node: string, f: (s: SidEntry) => SidEntry | undefined): SidTable {
  return { ...t, nodes: t.nodes.map((n) => (n.node !== node ? n : { ...n, sids: n.sids.map(f).filter((s): s is SidEntry => s !== undefined) })) };
}

describe("diffTables", () => {
  const a = allocOf(withServices());

  it("finds nothing between a table and itself, and exits 0", () => {
    const d = diffTables(a.table, a.table);
    expect(d.nodes).toEqual([]);
    expect(d.disruptive).toBe(false);
    expect(d.counts.sidsUnchanged).toBe(a.table.nodes.reduce((s, n) => s + n.sids.length, 0));
    expect(diffExitCode(d, false)).toBe(0);
  });

  it("reports a new router as additions only (exit 0)", () => {
    const grown = withServices();
    (grown.nodes as unknown[]).push({ name: "r5", place: "south/dock" });
    const b = allocOf(grown, a);
    const d = diffTables(a.table, b.table);
    expect(d.nodes.map((n) => [n.node, n.status])).toEqual([["r5", "added"]]);
    const r5 = d.nodes[0]!;
    expect(addrs(r5.sids.map((s) => s.new))).toEqual(addrs(sidsOf(b.table, "r5")));
    expect(r5.sids.every((s) => s.kind === "added")).toBe(true);
    expect(r5.locators.map((l) => l.kind)).toEqual(["added"]);
    expect(d.disruptive).toBe(false);
    expect(diffExitCode(d, false)).toBe(0);
  });

  it("reports a PE taken out of a VRF as a removal that touches the VRF (exit 1 unless accepted)", () => {
    const shrunk = withServices();
    (shrunk.vrfs as { pes: string[] }[])[0]!.pes = ["r1"];
    const b = allocOf(shrunk, a);
    const d = diffTables(a.table, b.table);
    const gone = sidsOf(a.table, "r4").filter((s) => s.context.vrf === "tills");
    expect(gone).toHaveLength(1);
    expect(d.nodes.map((n) => n.node)).toEqual(["r4"]);
    expect(d.nodes[0]!.sids.map((s) => [s.kind, formatAddr(s.old!.sid)])).toEqual([["removed", formatAddr(gone[0]!.sid)]]);
    expect(d.nodes[0]!.sids[0]!.touches).toEqual([{ kind: "vrf", name: "tills" }]);
    expect(d.disruptive).toBe(true);
    expect(diffExitCode(d, false)).toBe(1);
    expect(diffExitCode(d, true)).toBe(0);
  });

  it("reports a router moved to another site as its locator and every SID renumbered, and nothing on its peers", () => {
    const moved = withServices();
    (moved.nodes as { name: string; place: string }[]).find((n) => n.name === "r4")!.place = "north/mill";
    const b = allocOf(moved, a, true);
    const d = diffTables(a.table, b.table);
    expect(d.nodes.map((n) => n.node)).toEqual(["r4"]);
    const r4 = d.nodes[0]!;
    expect(r4.locators.map((l) => [l.kind, l.old!.prefix.format(), l.new!.prefix.format()])).toEqual([
      ["renumbered", a.table.nodes.find((n) => n.node === "r4")!.locators[0]!.prefix.format(), b.table.nodes.find((n) => n.node === "r4")!.locators[0]!.prefix.format()],
    ]);
    expect(r4.sids.every((s) => s.kind === "renumbered")).toBe(true);
    expect(addrs(r4.sids.map((s) => s.old))).toEqual(addrs(sidsOf(a.table, "r4")));
    expect(addrs(r4.sids.map((s) => s.new))).toEqual(addrs(sidsOf(b.table, "r4")));
    // each SID keeps its binding: the old and new SID of a pair are the same kind of thing
    for (const s of r4.sids) expect(bindingOf(s.old!)).toBe(bindingOf(s.new!));
    const kinds = new Set(r4.touches.map((t) => t.kind));
    expect(kinds).toEqual(new Set(["node", "vrf", "adjacency"]));
  });

  it("reports new adjacency flavours as End.X SIDs changed at the same address (flavours and codepoint)", () => {
    const b = allocOf(withServices({ "adjacency-flavors": [] }), a);
    const d = diffTables(a.table, b.table);
    const endX = a.table.nodes.flatMap((n) => n.sids.filter((s) => s.behavior === "End.X"));
    const changes = d.nodes.flatMap((n) => n.sids);
    expect(changes).toHaveLength(endX.length);
    for (const c of changes) {
      expect(c.kind).toBe("changed");
      expect(c.old!.sid).toBe(c.new!.sid);
      // IANA SRv6 Endpoint Behaviors registry: End.X with PSP is 6, End.X is 5
      expect([c.old!.codepoint, c.new!.codepoint]).toEqual([6, 5]);
      expect(c.fields).toEqual(["flavors", "codepoint"]);
      expect(c.touches.map((t) => t.kind)).toEqual(["adjacency"]);
    }
  });

  it("treats End SIDs with other flavours as other bindings: removed and added, never renumbered", () => {
    const b = allocOf(withServices({ "end-sids": [{ flavors: [] }, { flavors: ["USP"] }] }), a);
    const d = diffTables(a.table, b.table);
    const oldPud = a.table.nodes.flatMap((n) => n.sids.filter((s) => s.behavior === "End" && s.flavors.length > 0).map((s) => `${n.node} ${formatAddr(s.sid)}`));
    const newUsp = b.table.nodes.flatMap((n) => n.sids.filter((s) => s.behavior === "End" && s.flavors.length > 0).map((s) => `${n.node} ${formatAddr(s.sid)}`));
    const of = (kind: string) => d.nodes.flatMap((n) => n.sids.filter((s) => s.kind === kind).map((s) => `${n.node} ${formatAddr((s.old ?? s.new)!.sid)}`)).sort();
    expect(of("removed")).toEqual(oldPud.sort());
    expect(of("added")).toEqual(newUsp.sort());
    expect(of("renumbered")).toEqual([]);
    // the same swap written into a table at the same address is a change of that SID
    const target = sidsOf(a.table, "r2").find((s) => s.behavior === "End" && s.flavors.length > 0)!;
    const edited = editSids(a.table, "r2", (s) => (s === target ? { ...s, flavors: ["USP"], codepoint: undefined } : s));
    const [c] = diffTables(a.table, edited).nodes[0]!.sids;
    expect([c!.kind, c!.fields]).toEqual(["changed", ["flavors"]]);
    expect(bindingOf(c!.old!)).not.toBe(bindingOf(c!.new!));
  });

  it("reports a behaviour rewritten in a table row as a change at that address", () => {
    const target = sidsOf(a.table, "r2").find((s) => s.behavior === "End.DT4")!;
    const edited = editSids(a.table, "r2", (s) => (s === target ? { ...s, behavior: "End.DT46", codepoint: undefined } : s));
    const d = diffTables(a.table, edited);
    expect(d.nodes).toHaveLength(1);
    const [c] = d.nodes[0]!.sids;
    expect([c!.kind, c!.fields]).toEqual(["changed", ["behavior"]]);
    expect(c!.touches).toEqual([{ kind: "vrf", name: "gates" }]);
  });

  it("reports a VRF renamed on a SID that keeps its address as a change touching both VRFs", () => {
    const target = sidsOf(a.table, "r1").find((s) => s.context.vrf === "tills")!;
    const edited = editSids(a.table, "r1", (s) => (s === target ? { ...s, context: { ...s.context, vrf: "tolls" } } : s));
    const [c] = diffTables(a.table, edited).nodes[0]!.sids;
    expect([c!.kind, c!.fields]).toEqual(["changed", ["context"]]);
    expect(c!.touches).toEqual([
      { kind: "vrf", name: "tills" },
      { kind: "vrf", name: "tolls" },
    ]);
  });

  it("reports a changed argument length as a structure change", () => {
    const target = sidsOf(a.table, "r3")[0]!;
    const edited = editSids(a.table, "r3", (s) => (s === target ? { ...s, structure: { ...s.structure!, argument: 8 } } : s));
    const [c] = diffTables(a.table, edited).nodes[0]!.sids;
    expect([c!.kind, c!.fields]).toEqual(["changed", ["structure"]]);
  });

  it("reports a SID given another address as renumbered and a deleted row as removed", () => {
    const [first, second] = sidsOf(a.table, "r1");
    const edited = editSids(a.table, "r1", (s) => (s === first ? { ...s, sid: s.sid + 0x100n * (1n << 64n) } : s === second ? undefined : s));
    const d = diffTables(a.table, edited);
    const kinds = d.nodes[0]!.sids.map((s) => `${s.kind} ${formatAddr((s.old ?? s.new)!.sid)}`);
    expect(kinds.sort()).toEqual([`removed ${formatAddr(second!.sid)}`, `renumbered ${formatAddr(first!.sid)}`].sort());
  });

  it("matches duplicate rows one by one (a row written twice, then once)", () => {
    const dup = editSids(a.table, "r1", (s) => s);
    const twice = { ...dup, nodes: dup.nodes.map((n) => (n.node === "r1" ? { ...n, sids: [...n.sids, n.sids[0]!] } : n)) };
    const d = diffTables(twice, a.table);
    expect(d.nodes[0]!.sids.map((s) => [s.kind, s.old!.sid])).toEqual([["removed", sidsOf(a.table, "r1")[0]!.sid]]);
  });

  it("reports a removed node with all its SIDs and locators", () => {
    const gone = { ...a.table, nodes: a.table.nodes.filter((n) => n.node !== "r3") };
    const d = diffTables(a.table, gone);
    expect(d.nodes.map((n) => [n.node, n.status])).toEqual([["r3", "removed"]]);
    expect(d.counts.sidsRemoved).toBe(sidsOf(a.table, "r3").length);
    expect(d.counts.locatorsRemoved).toBe(a.table.nodes.find((n) => n.node === "r3")!.locators.length);
  });

  it("compares a plan's table and its own CSV or JSON form as equal, whatever columns and flavour order the CSV has", () => {
    const csv = readCsvTable(tableToCsv(a.table));
    const json = readJsonTable(tableToJson(a.table));
    expect(csv.problems).toEqual([]);
    expect(diffTables(a.table, csv.table).nodes).toEqual([]);
    expect(diffTables(json.table, a.table).nodes).toEqual([]);
    // a hand-written inventory: fewer columns, flavours in another order
    const rows = ["node,sid,behavior,flavors,context"];
    for (const n of a.table.nodes)
      for (const s of n.sids) rows.push([n.node, formatAddr(s.sid), s.behavior, [...s.flavors].reverse().join("+"), Object.entries(s.context).map(([k, v]) => `${k}=${v}`).join(";")].join(","));
    const bare = readCsvTable(rows.join("\n") + "\n");
    expect(bare.problems).toEqual([]);
    expect(diffTables(a.table, bare.table).nodes).toEqual([]);
  });

  it("keeps an anycast End SID apart from the node's own End SID", () => {
    const withAnycast = withServices({
      anycast: [{ name: "edge", place: "north/quay" }],
    });
    (withAnycast.nodes as { name: string; anycast?: string[] }[]).find((n) => n.name === "r1")!.anycast = ["edge"];
    (withAnycast.nodes as { name: string; anycast?: string[] }[]).find((n) => n.name === "r2")!.anycast = ["edge"];
    const b = allocOf(withAnycast);
    expect(diffTables(b.table, b.table).nodes).toEqual([]);
    // the anycast group's locator stays, r1 moves: only r1's own SIDs are renumbered
    const moved = structuredClone(withAnycast);
    (moved.nodes as { name: string; place: string }[]).find((n) => n.name === "r1")!.place = "north/mill";
    const c = allocOf(moved, b, true);
    const d = diffTables(b.table, c.table);
    const r1 = d.nodes.find((n) => n.node === "r1")!;
    const anycastPrefix = b.table.nodes.find((n) => n.node === "r1")!.locators.find((l) => l.anycast === "edge")!.prefix;
    const own = sidsOf(b.table, "r1").filter((s) => !anycastPrefix.contains(s.sid));
    expect(addrs(r1.sids.map((s) => s.old))).toEqual(addrs(own));
    expect(r1.sids.every((s) => s.kind === "renumbered")).toBe(true);
  });

  it("prints a summary row per changed node, a total and one line per change", () => {
    const shrunk = withServices();
    (shrunk.vrfs as { pes: string[] }[])[0]!.pes = ["r1"];
    const b = allocOf(shrunk, a);
    const side = { file: "x", kind: "plan" as const, plan: "test", nodes: 4, sids: 0 };
    const text = diffText(diffTables(a.table, b.table), side, side, false);
    expect(text).toMatch(/│ r4 +│ changed/);
    expect(text).toMatch(/│ total \(1 node\)/);
    expect(text.split("\n").filter((l) => l.startsWith("  - sid "))).toHaveLength(1);
    expect(text).toMatch(/^disruptive: 1 SID removed;/m);
  });
});
