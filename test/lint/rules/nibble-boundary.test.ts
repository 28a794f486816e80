import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "nibble-boundary";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
// An info rule: the sample plans should not even need a note.
const findingsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8")));
const row = (node: string, sid: string, st: string) => `${node},0,,${sid},End,,1,,${st.split("/").join(",")},`;

describe(RULE, () => {
  describe("valid", () => {
    it("a /48 block with 16-bit node and function fields", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("table rows on hex-digit boundaries, including a compressed End without function", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "48/16/16/0"), row("a", "5f00:100:1::", "32/16/0/80"), row("b", "5f00:0:100:2:1::", "44/20/12/0")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a /46 block: block 46, locator 62 and function 78 all split a hex digit (RFC 3596 §2.5 labels are one hex digit)", () => {
      const f = lintPlanWith(RULE, smallPlan({ blocks: [{ name: "b", prefix: "5f00:0:100::/46", structure: { node: 16, function: 16 } }] }));
      expect(f.map((x) => [x.rule, x.severity, x.objects, x.location.path, x.data.boundaries])).toEqual([[RULE, "info", ["b", "5f00:0:100::/46"], ["blocks", 0, "prefix"], "block 46, locator 62, function 78"]]);
    });
    it("a /48 block with 17 node bits (one algorithm bit): reported at the structure", () => {
      const plan = smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 16 } }] });
      const f = lintPlanWith(RULE, plan);
      expect(f.map((x) => [x.location.path, x.data.boundaries])).toEqual([[["blocks", 0, "structure"], "locator 65, function 81"]]);
    });
    it("table: one note per structure, however many nodes use it", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "45/16/16/0"), row("b", "5f00:0:100:2:1::", "45/16/16/0"), row("b", "5f00:0:100:2:2::", "45/16/16/0"), row("c", "5f00:0:100:3:1::", "48/16/16/0"));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.data.boundaries, x.data.count, x.data.nodes])).toEqual([[["a", "5f00:0:100:1:1::"], 1, "block 45, locator 61, function 77", 3, 2]]);
    });
  });
  describe("sample plans", () => {
    it("harbourline-metro gets no finding", () => {
      expect(findingsOn(sample("harbourline-metro.yaml"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("tessaline-backbone gets no finding", () => {
      expect(findingsOn(TESSALINE)).toEqual([]);
    });
  });
});
