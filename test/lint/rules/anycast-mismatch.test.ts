import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintJsonWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "anycast-mismatch";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");

const anycastPlan = smallPlan({
  anycast: [{ name: "edge", place: "quay" }],
  nodes: [
    { name: "r1", place: "quay", anycast: ["edge"] },
    { name: "r2", place: "quay", anycast: ["edge"] },
    { name: "r3", place: "mill" },
  ],
});

describe(RULE, () => {
  describe("valid", () => {
    it("members of a plan anycast group get the same SIDs under it", () => {
      expect(lintPlanWith(RULE, anycastPlan)).toEqual([]);
    });
    it("two nodes sharing a locator with the same SIDs", () => {
      const t = csv("a,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,");
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan (three anycast groups) has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a member lacks one SID of the shared locator (RFC 9352 §6: exactly the same SIDs)", () => {
      const t = csv(
        "a,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,",
        "a,0,5f00:0:100:ff::/64,5f00:0:100:ff:2::,End,PSP,2,0x2,48,16,16,0,",
        "b,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,",
      );
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([[RULE, ["5f00:0:100:ff::/64", "b"], 3, { locator: "5f00:0:100:ff::/64", algorithm: 0, members: 2, differing: 1, missing: 1 }]]);
    });
    it("the same address with another flavour on each member is a mismatch on both", () => {
      const t = csv("a,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,PSP,2,0x1,48,16,16,0,", "b,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.data.differing, x.data.missing])).toEqual([[["5f00:0:100:ff::/64", "a", "b"], 2, 2]]);
    });
    it("a declared member of the plan group lacks the anycast locator altogether", () => {
      const json = {
        schema: "sidcarve/sid-table/v1",
        plan: "lint-test",
        nodes: [
          { node: "r1", locators: [{ prefix: "5f00:0:100:1::/64", algorithm: 0 }, { prefix: "5f00:0:100:ff::/64", algorithm: 0, anycast: "edge" }], sids: [{ sid: "5f00:0:100:1:1::", behavior: "End" }, { sid: "5f00:0:100:ff:1::", behavior: "End" }] },
          { node: "r2", locators: [{ prefix: "5f00:0:100:2::/64", algorithm: 0 }], sids: [{ sid: "5f00:0:100:2:1::", behavior: "End" }] },
        ],
      };
      const f = lintJsonWith(RULE, json, anycastPlan);
      // r2's first (and only) SID is table entry 3.
      expect(f.map((x) => [x.objects, x.location.row, x.data.group, x.data.members])).toEqual([[["5f00:0:100:ff::/64", "r2", "edge"], 3, "edge", 2]]);
    });
  });
});
