import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "locator-overlap";

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan has disjoint locators", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("members of a declared anycast group may share a locator", () => {
      const plan = smallPlan({
        anycast: [{ name: "edge", place: "quay" }],
        nodes: [
          { name: "r1", place: "quay", anycast: ["edge"] },
          { name: "r2", place: "quay", anycast: ["edge"] },
          { name: "r3", place: "mill" },
        ],
      });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("a table whose nodes have separate locators", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End,,1,0x1,48,16,16,0,");
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("two nodes with the same locator (RFC 9352 §6: only anycast locators are shared)", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:1::/64,5f00:0:100:1:2::,End,,1,0x2,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.objects.slice(0, 2), x.location.row])).toEqual([[RULE, ["a", "b"], 2]]);
    });
    it("a locator nested inside another node's locator", () => {
      const t = csv("a,0,5f00:0:100::/56,5f00:0:100:1:1::,End,,1,0x1,48,8,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f).toHaveLength(1);
      expect(f[0]!.data).toMatchObject({ nodeA: "a", nodeB: "b", locatorA: "5f00:0:100::/56", locatorB: "5f00:0:100:2::/64" });
    });
    it("sweeps past closed ranges: only the real overlap is reported", () => {
      const rows = [];
      for (let i = 1; i <= 50; i++) rows.push(`n${i},0,5f00:0:100:${i.toString(16)}::/64,5f00:0:100:${i.toString(16)}:1::,End,,1,0x1,48,16,16,0,`);
      rows.push("dup,0,5f00:0:100:20::/64,5f00:0:100:20:2::,End,,1,0x2,48,16,16,0,");
      const f = lintCsvWith(RULE, csv(...rows));
      expect(f.map((x) => x.objects.slice(0, 2).sort())).toEqual([["dup", "n32"]]);
    });
  });
});
