import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "vrf-table-shared";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");

/** A decapsulation SID row of node r1 (function `fn`) with a VRF and table in its context. */
const dt = (node: string, fn: number, behavior: string, context: string) => `${node},0,5f00:0:100:1::/64,5f00:0:100:1:${fn.toString(16)}::,${behavior},,,0x${fn.toString(16)},48,16,16,0,${context}`;

describe(RULE, () => {
  describe("valid", () => {
    it("VRFs with tables of their own, on one PE", () => {
      const plan = smallPlan({
        vrfs: [
          { name: "shops", table: 10, families: ["ipv4"], pes: ["r1", "r2"] },
          { name: "trams", table: 20, families: ["ipv4", "ipv6"], mode: "split", pes: ["r1"] },
        ],
      });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("one VRF's SIDs of two families naming its one table", () => {
      expect(lintCsvWith(RULE, csv(dt("r1", 1, "End.DT4", "family=ipv4;table=10;vrf=shops"), dt("r1", 2, "End.DT6", "family=ipv6;table=10;vrf=shops")))).toEqual([]);
    });
    it("two VRFs with one table number on different PEs (tables are a PE's own)", () => {
      expect(lintCsvWith(RULE, csv(dt("r1", 1, "End.DT4", "table=10;vrf=shops"), dt("r2", 1, "End.DT4", "table=10;vrf=trams")))).toEqual([]);
    });
    it("SIDs whose context names no table, and End.DX4 cross-connects", () => {
      expect(lintCsvWith(RULE, csv(dt("r1", 1, "End.DT4", "vrf=shops"), dt("r1", 2, "End.DT4", "vrf=trams"), dt("r1", 3, "End.DX4", "table=10;vrf=a"), dt("r1", 4, "End.DX4", "table=10;vrf=b")))).toEqual([]);
    });
    it("the sample plans", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
      if (existsSync(TESSALINE)) expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("two VRFs of a plan on one PE with one table (RFC 8986 §4.6: the SID names one table)", () => {
      const plan = smallPlan({
        vrfs: [
          { name: "shops", table: 10, families: ["ipv4"], pes: ["r1", "r2"] },
          { name: "council", table: 10, families: ["ipv4", "ipv6"], mode: "combined", pes: ["r1"] },
        ],
      });
      const f = lintPlanWith(RULE, plan);
      expect(f.map((x) => [x.objects, x.data])).toEqual([[["r1", "shops", "council"], { node: "r1", table: "10", vrf: "shops", other: "council" }]]);
      expect(f[0]!.severity).toBe("error");
    });
    it("in a table: once per node, table and pair of VRFs, at the second VRF's SID", () => {
      const t = csv(
        dt("r1", 1, "End.DT4", "table=10;vrf=shops"),
        dt("r1", 2, "End.DT4", "table=10;vrf=trams"),
        dt("r1", 3, "End.DT6", "table=10;vrf=trams"),
        dt("r1", 4, "End.DT46", "table=10;vrf=meters"),
      );
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.data.vrf, x.data.other, x.location.row])).toEqual([
        ["shops", "trams", 2],
        ["shops", "meters", 4],
      ]);
      expect(f[0]!.message).toContain("5f00:0:100:1:1::");
      expect(f[0]!.message).toContain("5f00:0:100:1:2::");
    });
  });
});
