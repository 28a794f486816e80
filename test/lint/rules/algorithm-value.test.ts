import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "algorithm-value";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, algorithm: number, sid: string, locator: string) => `${node},${algorithm},${locator},${sid},End,,1,,48,16,16,0,`;
const twoAlgos = (second: number) =>
  smallPlan({ algorithms: [{ id: 0 }, { id: second }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, second], "algorithm-bits": 1, structure: { node: 17, function: 16 } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("plans with algorithm 0 and a Flex-Algo (128 and 255 are Flex-Algos, RFC 9350 §4)", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      expect(lintPlanWith(RULE, twoAlgos(128))).toEqual([]);
      expect(lintPlanWith(RULE, twoAlgos(255))).toEqual([]);
    });
    it("table rows with algorithms 0, 1 (strict SPF), 128 and 255", () => {
      const t = csv(row("a", 0, "5f00:0:100:1:1::", "5f00:0:100:1::/64"), row("a", 1, "5f00:0:100:2:1::", "5f00:0:100:2::/64"), row("a", 128, "5f00:0:100:3:1::", "5f00:0:100:3::/64"), row("a", 255, "5f00:0:100:4:1::", "5f00:0:100:4::/64"));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a plan declaring algorithm 127 (unassigned in the IANA IGP Algorithm Types registry)", () => {
      const f = lintPlanWith(RULE, twoAlgos(127));
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data.algorithm])).toEqual([[RULE, ["flex-algo-127", "127"], ["algorithms", 1, "id"], 127]]);
    });
    it("table rows of algorithm 2: one finding per node, at its first such row", () => {
      const t = csv(row("a", 0, "5f00:0:100:1:1::", "5f00:0:100:1::/64"), row("a", 2, "5f00:0:100:2:2::", "5f00:0:100:2::/64"), row("a", 2, "5f00:0:100:2:1::", "5f00:0:100:2::/64"), row("b", 2, "5f00:0:100:5:1::", "5f00:0:100:5::/64"));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.location.field, x.data.sids, x.data.locators])).toEqual([
        [["a", "2"], 2, "algorithm", 2, 1],
        [["b", "2"], 4, "algorithm", 1, 1],
      ]);
    });
  });
  describe("sample plans", () => {
    it("harbourline-metro has no error-level finding", () => {
      expect(errorsOn(sample("harbourline-metro.yaml"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("tessaline-backbone has no error-level finding", () => {
      expect(errorsOn(TESSALINE)).toEqual([]);
    });
  });
});
