import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "summary-unclean";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");

// r1, r2 in quay at node values 1 and 4; r3 of mill at 2, between them.
const MIXED = csv("r1,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "r2,0,5f00:0:100:4::/64,5f00:0:100:4:1::,End,,1,0x1,48,16,16,0,", "r3,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End,,1,0x1,48,16,16,0,");

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan numbers each group contiguously", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("a bare table has no groups to judge", () => {
      expect(lintCsvWith(RULE, MIXED)).toEqual([]);
    });
    it("the harbourline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("quay's locators :1 and :4 need 5f00:0:100::/61, which swallows mill's :2", () => {
      // node fields 0x0001 and 0x0004 share their first 13 bits: /48 + 13 = /61 covering :0-:7.
      const f = lintCsvWith(RULE, MIXED, smallPlan());
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([
        [RULE, ["quay", "5f00:0:100::/61", "r3"], 3, { group: "quay", covering: "5f00:0:100::/61", swallows: 1, members: 2, algorithm: 0, block: "b" }],
      ]);
    });
  });
});
