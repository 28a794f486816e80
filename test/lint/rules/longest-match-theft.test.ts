import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "longest-match-theft";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan, also with Flex-Algo locators side by side", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      const flex = smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }] });
      expect(lintPlanWith(RULE, flex)).toEqual([]);
    });
    it("a node's own more specific locator of the same algorithm routes to the same place", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,0,5f00:0:100:1:8000::/65,5f00:0:100:1:8001::,End,,1,0x1,48,17,15,0,");
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("infrastructure beside the block, as in the sample plans", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a Flex-Algo locator nested in the node's algorithm 0 locator takes its SIDs (RFC 9352 §5)", () => {
      const t = csv(
        "n,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
        "n,0,5f00:0:100:1::/64,5f00:0:100:1:8001::,End.X,,5,0x8001,48,16,16,0,neighbor=m",
        "n,128,5f00:0:100:1:8000::/65,5f00:0:100:1:8002::,End,,1,0x2,48,17,15,0,",
      );
      const f = lintCsvWith(RULE, t);
      // 5f00:0:100:1:8001:: (algorithm 0) lies in the /65, so the /65 wins for it.
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([
        [RULE, ["n", "5f00:0:100:1::/64", "n", "5f00:0:100:1:8000::/65"], 3, { locator: "5f00:0:100:1::/64", algorithm: 0, thief: "5f00:0:100:1:8000::/65", thiefKind: "locator", thieves: 1, stolenSids: 1 }],
      ]);
    });
    it("another node's locator inside a locator", () => {
      const t = csv("a,0,5f00:0:100::/56,5f00:0:100:2:1::,End,,1,0x1,48,8,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:2:2::,End,,1,0x2,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.data.stolenSids])).toEqual([[["a", "5f00:0:100::/56", "b", "5f00:0:100:2::/64"], 2, 1]]);
    });
    it("an infrastructure prefix of the plan inside an allocated locator, located at the infrastructure entry", () => {
      // smallPlan: block /48, site 8 bits (quay = 0), router 8 bits from 1: r1 owns 5f00:0:100:1::/64 (RFC 8986 §3.1 B:N).
      const plan = smallPlan({ infrastructure: [{ name: "loops", prefix: "5f00:0:100:1:ff00::/72", kind: "loopback" }] });
      const f = lintPlanWith(RULE, plan);
      expect(f.map((x) => [x.objects, x.location.path, x.data.thiefKind])).toEqual([[["r1", "5f00:0:100:1::/64", "loops", "5f00:0:100:1:ff00::/72"], ["infrastructure", 0, "prefix"], "infrastructure"]]);
    });
    it("an infrastructure prefix inside a table's locator is located at the first SID it takes", () => {
      const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,0,5f00:0:100:1::/64,5f00:0:100:1:ff01::,End.X,,5,0xff01,48,16,16,0,neighbor=b");
      const f = lintCsvWith(RULE, t, smallPlan({ infrastructure: [{ name: "loops", prefix: "5f00:0:100:1:ff00::/72" }] }));
      expect(f.map((x) => [x.location.row, x.data.stolenSids])).toEqual([[2, 1]]);
    });
    it("one finding per robbed locator, however many prefixes rob it", () => {
      const t = csv(
        "agg,0,5f00:0:100::/56,5f00:0:100:1:1::,End,,1,0x1,48,8,16,0,",
        "agg,0,5f00:0:100::/56,5f00:0:100:2:1::,End.X,,5,0x2,48,8,16,0,neighbor=b",
        "b,0,5f00:0:100:1::/64,5f00:0:100:1:2::,End,,1,0x2,48,16,16,0,",
        "c,0,5f00:0:100:2::/64,5f00:0:100:2:2::,End,,1,0x2,48,16,16,0,",
        "d,0,5f00:0:100:3::/64,5f00:0:100:3:2::,End,,1,0x2,48,16,16,0,",
      );
      const f = lintCsvWith(RULE, t);
      // b and c each take one SID of agg; d takes none.
      expect(f.map((x) => [x.objects.slice(0, 2), x.location.row, x.data.thieves, x.data.stolenSids])).toEqual([[["agg", "5f00:0:100::/56"], 3, 3, 2]]);
    });
    it("the sweep finds the one nesting among many disjoint locators", () => {
      const rows = [];
      for (let i = 1; i <= 60; i++) rows.push(`n${i},0,5f00:0:100:${i.toString(16)}::/64,5f00:0:100:${i.toString(16)}:1::,End,,1,0x1,48,16,16,0,`);
      rows.push("thief,0,5f00:0:100:2a:8000::/65,5f00:0:100:2a:8000::,End,,1,0x0,48,17,15,0,");
      const f = lintCsvWith(RULE, csv(...rows));
      expect(f.map((x) => [x.data.locator, x.data.thief])).toEqual([["5f00:0:100:2a::/64", "5f00:0:100:2a:8000::/65"]]);
    });
  });
});
