import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "summary-leak";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");
// smallPlan: block 5f00:0:100::/48, site 8 bits (quay = 0, mill = 1, sequential), router 8 bits.
// So quay owns 5f00:0:100::/56 and mill 5f00:0:100:100::/56 (block + site value, RFC 3531 levels).
const summaries = (quay: string, mill: string) => ({ groups: { quay: { summary: quay }, mill: { summary: mill } } });

describe(RULE, () => {
  describe("valid", () => {
    it("natural summaries of an allocated plan hold", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("declared summaries that match the groups' space", () => {
      expect(lintPlanWith(RULE, smallPlan(summaries("5f00:0:100::/56", "5f00:0:100:100::/56")))).toEqual([]);
    });
    it("Flex-Algo: one natural summary per algorithm (algorithm bit after the block)", () => {
      const flex = smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }] });
      expect(lintPlanWith(RULE, flex)).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a declared summary in the sibling's space: members outside, a foreign locator inside", () => {
      const f = lintPlanWith(RULE, smallPlan(summaries("5f00:0:100:100::/56", "5f00:0:100:100::/56")));
      const quay = f.filter((x) => x.data.group === "quay");
      expect(quay.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["quay", "5f00:0:100:100::/56", "r1", "r2"], ["groups", "quay", "summary"], { group: "quay", summary: "5f00:0:100:100::/56", kind: "declared", direction: "outside", count: 2 }],
        [RULE, ["quay", "5f00:0:100:100::/56", "r3"], ["groups", "quay", "summary"], { group: "quay", summary: "5f00:0:100:100::/56", kind: "declared", direction: "foreign", count: 1 }],
      ]);
      expect(f.filter((x) => x.data.group === "mill")).toEqual([]);
    });
    it("natural summaries: an anycast group numbered in quay whose only member sits in mill", () => {
      const plan = smallPlan({
        anycast: [{ name: "edge", place: "quay" }],
        nodes: [
          { name: "r1", place: "quay" },
          { name: "r2", place: "quay" },
          { name: "r3", place: "mill", anycast: ["edge"] },
        ],
      });
      const f = lintPlanWith(RULE, plan);
      expect(f.map((x) => [x.data.group, x.data.kind, x.data.direction, x.data.summary, x.location.path])).toEqual([
        ["quay", "natural", "foreign", "5f00:0:100::/56", ["groups", "quay"]],
        ["mill", "natural", "outside", "5f00:0:100:100::/56", ["groups", "mill"]],
      ]);
    });
    it("a table linted with the plan: a quay router numbered in mill's space, located at its row", () => {
      const t = csv("r1,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "r2,0,5f00:0:100:102::/64,5f00:0:100:102:1::,End,,1,0x1,48,16,16,0,", "r3,0,5f00:0:100:101::/64,5f00:0:100:101:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t, smallPlan(summaries("5f00:0:100::/56", "5f00:0:100:100::/56")));
      expect(f.map((x) => [x.data.group, x.data.direction, x.objects, x.location.row])).toEqual([
        ["quay", "outside", ["quay", "5f00:0:100::/56", "r2"], 2],
        ["mill", "foreign", ["mill", "5f00:0:100:100::/56", "r2"], 2],
      ]);
    });
  });
});
