import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "capacity";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");

// A 2-bit router level with value 0 reserved holds 3 routers per site; quay gets all 3.
const tightLevels = (extra: Record<string, unknown> = {}) =>
  smallPlan({
    levels: [
      { name: "site", bits: 14 },
      { name: "router", bits: 2, reserved: [0] },
    ],
    nodes: [
      { name: "r1", place: "quay" },
      { name: "r2", place: "quay" },
      { name: "r4", place: "quay" },
      { name: "r3", place: "mill" },
    ],
    ...extra,
  });

// NEXT-CSID, 16-bit C-SIDs: GIB of 3 values for 3 node C-SIDs (quay 0x0001, 0x0002; mill 0x0101),
// LIB of 2 values; r2 has two End.X SIDs, each a local C-SID (RFC 9800 §5).
const compressed = (gib: string[], lib: string[]) =>
  smallPlan({ blocks: [{ name: "c", prefix: "5f00:1::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": gib, "local-pool": lib } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("a roomy plan", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("a full level at a threshold of 1 is not above it", () => {
      expect(lintPlanWith(RULE, tightLevels({ lint: { "capacity-threshold": 1 } }))).toEqual([]);
    });
    it("GIB and LIB with room (3 of 4 node C-SIDs is 75 %)", () => {
      expect(lintPlanWith(RULE, compressed(["0x0001-0x0002", "0x0101-0x0102"], ["0xe000-0xe0ff"]))).toEqual([]);
    });
    it("the harbourline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a level filled above 80 %: 3 of 3 routers in quay", () => {
      const f = lintPlanWith(RULE, tightLevels());
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["router", "quay"], ["levels", 1, "bits"], { kind: "level", name: "router", where: "quay", used: 3, capacity: 3, threshold: 0.8 }],
      ]);
    });
    it("a function pool filled above the threshold, located at the plan's pool", () => {
      // r2 has two links, so two End.X SIDs in a pool of two values.
      const f = lintPlanWith(RULE, smallPlan({ "function-pools": { adjacency: ["0x1000-0x1001"] } }));
      expect(f.map((x) => [x.objects, x.location.path, x.data.used, x.data.capacity])).toEqual([[["b/adjacency", "r2"], ["function-pools", "adjacency"], 2, 2]]);
    });
    it("a lower threshold from the plan", () => {
      const f = lintPlanWith(RULE, smallPlan({ "function-pools": { adjacency: ["0x1000-0x1003"] }, lint: { "capacity-threshold": 0.4 } }));
      expect(f.map((x) => [x.data.name, x.data.used, x.data.capacity, x.data.threshold])).toEqual([["b/adjacency", 2, 4, 0.4]]);
    });
    it("a full GIB and a full LIB on the fullest node", () => {
      const f = lintPlanWith(RULE, compressed(["0x0001-0x0002", "0x0101"], ["0xe000-0xe001"]));
      const csid = f.filter((x) => x.data.kind === "gib" || x.data.kind === "lib");
      expect(csid.map((x) => [x.objects, x.location.path, x.data.kind, x.data.where, x.data.used, x.data.capacity])).toEqual([
        [["c"], ["blocks", 0, "compression", "global-pool"], "gib", "", 3, 3],
        [["c", "r2"], ["blocks", 0, "compression", "local-pool"], "lib", "r2", 2, 2],
      ]);
    });
    it("an inventory linted with the plan: C-SIDs counted from the table", () => {
      const row = (n: string, csid: string, fn: string) => `${n},0,5f00:1:${csid}::/48,5f00:1:${csid}:${fn}::,End.X,NEXT-CSID,52,0x${fn},32,16,16,64,neighbor=x`;
      const t = csv(row("r1", "1", "e000"), row("r2", "2", "e000"), row("r3", "101", "e000"), row("r3", "101", "e001"));
      const f = lintCsvWith(RULE, t, compressed(["0x0001-0x0002", "0x0101"], ["0xe000-0xe001"]));
      expect(f.map((x) => [x.data.kind, x.data.where, x.data.used, x.data.capacity])).toEqual([
        ["gib", "", 3, 3],
        ["lib", "r3", 2, 2],
      ]);
    });
  });
});
