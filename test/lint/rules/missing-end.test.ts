import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "missing-end";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");
const flexPlan = smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("every allocated node has its End SIDs, also per Flex-Algo", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      expect(lintPlanWith(RULE, flexPlan)).toEqual([]);
    });
    it("an End SID known by its codepoint (2 = End with PSP) counts whatever its name", () => {
      expect(lintCsvWith(RULE, csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,END-PSP,PSP,2,0x1,48,16,16,0,"))).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a node with only End.X SIDs (RFC 9513 §8: at least one End SID)", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End.X,PSP,6,0x1,48,16,16,0,neighbor=a");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([[RULE, ["b"], 2, { node: "b", algorithm: 0 }]]);
    });
    it("an End SID for algorithm 0 only, while the node has a Flex-Algo 128 locator (RFC 9350 §14.2)", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,128,5f00:0:100:8001::/64,5f00:0:100:8001:2::,End.X,,5,0x2,48,16,16,0,neighbor=b");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.data.algorithm])).toEqual([[["a"], 128]]);
    });
    it("the plan's node algorithms count when the table has no locator for them", () => {
      const t = csv("r1,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,17,15,0,");
      const f = lintCsvWith(RULE, t, flexPlan);
      expect(f.map((x) => [x.objects, x.location.row, x.data.algorithm])).toEqual([[["r1"], 1, 128]]);
    });
    it("an End SID under a shared anycast locator does not name the node", () => {
      const t = csv("a,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => x.data.node)).toEqual(["a"]);
    });
  });
});
