import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "block-aggregation";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const twoBlocks = (second: string) =>
  smallPlan({
    algorithms: [{ id: 0 }, { id: 128 }],
    blocks: [
      { name: "base", prefix: "5f00:0:100::/48", algorithms: [0], structure: { node: 16, function: 16 } },
      { name: "flex", prefix: second, algorithms: [128], structure: { node: 16, function: 16 } },
    ],
  });
const row = (node: string, loc: string, sid: string) => `${node},0,${loc},${sid},End,,1,0x1,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("one block", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("two adjacent /48 blocks collapse into one /47", () => {
      expect(lintPlanWith(RULE, twoBlocks("5f00:0:101::/48"))).toEqual([]);
    });
    it("a bare table within one /48 of its advertised block length", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::/64", "5f00:0:100:1:1::"), row("b", "5f00:0:100:2::/64", "5f00:0:100:2:1::")))).toEqual([]);
    });
    it("a bare table without SID structure has no block length to judge by", () => {
      expect(lintCsvWith(RULE, "node,sid,behavior\na,5f00:0:100:1:1::,End\nb,5f00:0:900:1:1::,End\n")).toEqual([]);
    });
    it("the harbourline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan (5f00:7e50::/32 + 5f00:7e51::/32 = one /31) has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("two blocks that do not aggregate (RFC 8754 §5.1: one block S/s)", () => {
      // 0x0100 and 0x0300 in bits 32-47 share 6 leading bits: covering prefix /38.
      const f = lintPlanWith(RULE, twoBlocks("5f00:0:300::/48"));
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["5f00:0:100::/48", "5f00:0:300::/48"], ["blocks", 1, "prefix"], { prefixes: 2, list: "5f00:0:100::/48 5f00:0:300::/48", covering: "5f00::/38", smallest: "5f00:0:300::/48", blockLength: 48 }],
      ]);
    });
    it("a bare table with one stray /48: located at the first SID of the smaller part", () => {
      const t = csv(row("a", "5f00:0:100:1::/64", "5f00:0:100:1:1::"), row("b", "5f00:0:100:2::/64", "5f00:0:100:2:1::"), row("c", "5f00:0:900:3::/64", "5f00:0:900:3:1::"));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.location.row, x.data.prefixes, x.data.smallest])).toEqual([[3, 2, "5f00:0:900::/48"]]);
    });
    it("with a plan, a locator outside the declared block counts as its own /48", () => {
      const t = csv(row("r1", "5f00:0:100:1::/64", "5f00:0:100:1:1::"), row("x", "5f00:0:900:3::/64", "5f00:0:900:3:1::"));
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => [x.location.row, x.data.list])).toEqual([[2, "5f00:0:100::/48 5f00:0:900::/48"]]);
    });
  });
});
