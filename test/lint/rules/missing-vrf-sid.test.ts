import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "missing-vrf-sid";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");

const dt = (node: string, n: number, behavior: string, vrf: string, algo = 0) => `${node},${algo},5f00:0:100:${n}::/64,5f00:0:100:${n}:${behavior.length.toString(16)}${vrf.length}00::,${behavior},,,0x1,48,16,16,0,vrf=${vrf}`;
const combined = smallPlan({ vrfs: [{ name: "shops", families: ["ipv4", "ipv6"], mode: "combined", pes: ["r1", "r3"] }] });

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan gives every PE its VRF SIDs (combined and split)", () => {
      const plan = smallPlan({
        vrfs: [
          { name: "shops", families: ["ipv4", "ipv6"], mode: "combined", pes: ["r1", "r3"] },
          { name: "trams", families: ["ipv4", "ipv6"], mode: "split", pes: ["r2"] },
          { name: "meters", families: ["ipv4"], pes: ["r3"] },
        ],
      });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("a combined VRF served by End.DT4 and End.DT6 together still reaches both families", () => {
      expect(lintCsvWith(RULE, csv(dt("r1", 1, "End.DT46", "shops"), dt("r3", 3, "End.DT4", "shops"), dt("r3", 3, "End.DT6", "shops")), combined)).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a PE with End.DT4 only for a combined IPv4+IPv6 VRF (RFC 9252 §5)", () => {
      const f = lintCsvWith(RULE, csv(dt("r1", 1, "End.DT46", "shops"), dt("r3", 3, "End.DT4", "shops")), combined);
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([[RULE, ["r3", "shops"], 2, { vrf: "shops", pe: "r3", missing: "End.DT46", families: "ipv6", algorithm: 0 }]]);
    });
    it("a split VRF missing its End.DT6 on one PE", () => {
      const plan = smallPlan({ vrfs: [{ name: "trams", families: ["ipv4", "ipv6"], mode: "split", pes: ["r2"] }] });
      const f = lintCsvWith(RULE, csv(dt("r2", 2, "End.DT4", "trams")), plan);
      expect(f.map((x) => [x.data.pe, x.data.missing])).toEqual([["r2", "End.DT6"]]);
    });
    it("a VRF carried over Flex-Algo 128 whose SID sits under algorithm 0", () => {
      const plan = smallPlan({
        algorithms: [{ id: 0 }, { id: 128 }],
        blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }],
        vrfs: [{ name: "fast", families: ["ipv4"], algorithm: 128, pes: ["r1"] }],
      });
      const f = lintCsvWith(RULE, csv(dt("r1", 1, "End.DT4", "fast", 0)), plan);
      expect(f.map((x) => [x.data.pe, x.data.missing, x.data.algorithm])).toEqual([["r1", "End.DT4", 128]]);
    });
    it("the SIDs a PE has under other algorithms are listed in address order, not row order", () => {
      const t = csv("r1,128,5f00:0:100:9::/64,5f00:0:100:9:2::,End.DT6,,,0x2,,,,,vrf=shops", "r1,128,5f00:0:100:9::/64,5f00:0:100:9:1::,End.DT4,,,0x1,,,,,vrf=shops");
      const f = lintCsvWith(RULE, t, smallPlan({ vrfs: [{ name: "shops", families: ["ipv4", "ipv6"], mode: "combined", pes: ["r1"] }] }));
      expect(f.map((x) => x.message.split("; it has ")[1])).toEqual(["End.DT4 under algorithm 128, End.DT6 under algorithm 128"]);
    });
  });
});
