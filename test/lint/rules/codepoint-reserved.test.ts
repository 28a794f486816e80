import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "codepoint-reserved";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, cp: number | "") => `${node},0,,${sid},${behavior},,${cp},,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("assigned values, private use (33000) and opaque (65535) are not reserved (RFC 8986 §10.2.1)", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", 1), row("a", "5f00:0:100:1:2::", "End.DT46", 20), row("a", "5f00:0:100:1:3::", "End.DT2M", 124), row("a", "5f00:0:100:1:4::", "End", 33000), row("a", "5f00:0:100:1:5::", "End.DT4", 65535), row("a", "5f00:0:100:1:6::", "End", 32767));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("0 (never allocated), 25 (registered as Reserved), 34816 and 65534 (reserved range)", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", 0), row("b", "5f00:0:100:2:1::", "End", 25), row("c", "5f00:0:100:3:1::", "End", 34816), row("d", "5f00:0:100:4:1::", "End", 65534));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data.codepoint, x.data.kind])).toEqual([
        [RULE, ["a", "5f00:0:100:1:1::"], 1, 0, "reserved"],
        [RULE, ["b", "5f00:0:100:2:1::"], 2, 25, "reserved"],
        [RULE, ["c", "5f00:0:100:3:1::"], 3, 34816, "reserved"],
        [RULE, ["d", "5f00:0:100:4:1::"], 4, 65534, "reserved"],
      ]);
    });
    it("unassigned values: 98 and 113 are unassigned in the registry", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", 98), row("a", "5f00:0:100:1:2::", "End.DT4", 113)));
      expect(f.map((x) => [x.data.codepoint, x.data.kind, x.location.row])).toEqual([
        [98, "unassigned", 1],
        [113, "unassigned", 2],
      ]);
    });
    it("one finding per node and codepoint", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:2::", "End", 0), row("a", "5f00:0:100:1:1::", "End.X", 0), row("b", "5f00:0:100:2:1::", "End", 0)));
      expect(f.map((x) => [x.data.node, x.data.count, x.location.row])).toEqual([
        ["a", 2, 1],
        ["b", 1, 3],
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
