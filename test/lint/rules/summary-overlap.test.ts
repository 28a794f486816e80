import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { lintPlanWith, smallPlan } from "../harness.js";

const RULE = "summary-overlap";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");
const summaries = (quay: string, mill: string) => ({ groups: { quay: { summary: quay }, mill: { summary: mill } } });

describe(RULE, () => {
  describe("valid", () => {
    it("disjoint sibling summaries", () => {
      expect(lintPlanWith(RULE, smallPlan(summaries("5f00:0:100::/56", "5f00:0:100:100::/56")))).toEqual([]);
    });
    it("a parent's summary holding its child's is not a sibling overlap", () => {
      const plan = smallPlan({
        levels: [
          { name: "region", bits: 4 },
          { name: "site", bits: 4 },
          { name: "router", bits: 8, reserved: [0] },
        ],
        groups: { north: { summary: "5f00:0:100::/52", groups: { quay: { summary: "5f00:0:100::/56" }, mill: { summary: "5f00:0:100:100::/56" } } } },
        nodes: [
          { name: "r1", place: "north/quay" },
          { name: "r2", place: "north/quay" },
          { name: "r3", place: "north/mill" },
        ],
      });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("two siblings declare the same summary: one finding, at the later group", () => {
      const f = lintPlanWith(RULE, smallPlan(summaries("5f00:0:100::/56", "5f00:0:100::/56")));
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["quay", "mill", "5f00:0:100::/56", "5f00:0:100::/56"], ["groups", "mill", "summary"], { group: "mill", other: "quay", summary: "5f00:0:100::/56", otherSummary: "5f00:0:100::/56" }],
      ]);
    });
    it("one sibling's summary inside the other's", () => {
      const f = lintPlanWith(RULE, smallPlan(summaries("5f00:0:100::/52", "5f00:0:100:100::/56")));
      expect(f.map((x) => [x.data.group, x.data.other])).toEqual([["mill", "quay"]]);
    });
  });
});
