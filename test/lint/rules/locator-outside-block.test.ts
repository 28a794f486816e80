import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "locator-outside-block";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan carves every locator from its block", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("a table whose locators lie in the plan's block 5f00:0:100::/48", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,");
      expect(lintCsvWith(RULE, t, smallPlan())).toEqual([]);
    });
    it("a bare table is not judged (no declared blocks)", () => {
      expect(lintCsvWith(RULE, csv("a,0,5f00:0:200:1::/64,5f00:0:200:1:1::,End,,1,0x1,48,16,16,0,"))).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a locator in another /48 than the block (RFC 8986 §3.1: locator = B:N)", () => {
      const t = csv(
        "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
        "x,0,5f00:0:200:1::/64,5f00:0:200:1:1::,End,,1,0x1,48,16,16,0,",
        "x,0,5f00:0:200:1::/64,5f00:0:200:1:2::,End.X,,5,0x2,48,16,16,0,neighbor=a",
      );
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([[RULE, ["x", "5f00:0:200:1::/64"], 2, { locator: "5f00:0:200:1::/64", algorithm: 0, nodes: "x" }]]);
    });
    it("a locator wider than the block that holds the block is not inside it", () => {
      const t = csv("w,0,5f00::/40,5f00:0:100:1:1::,End,,1,0x1,40,24,16,0,");
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => x.data.locator)).toEqual(["5f00::/40"]);
    });
    it("one finding for a locator shared by two nodes, naming both", () => {
      const t = csv("p,0,5f00:0:300:1::/64,5f00:0:300:1:1::,End,,1,0x1,48,16,16,0,", "q,0,5f00:0:300:1::/64,5f00:0:300:1:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => [x.objects, x.location.row])).toEqual([[["p", "q", "5f00:0:300:1::/64"], 1]]);
    });
  });
});
