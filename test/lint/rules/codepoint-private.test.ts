import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "codepoint-private";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, cp: number | "") => `${node},0,,${sid},${behavior},,${cp},,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("registered values, and 65535 (opaque) on BGP service SIDs (RFC 8986 §8.3, §8.4)", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", 1), row("a", "5f00:0:100:1:4000::", "End.DT4", 65535), row("a", "5f00:0:100:1:4001::", "End.DX6", 65535), row("a", "5f00:0:100:1:8000::", "End.DT2M", 65535), row("a", "5f00:0:100:1:8001::", "End.DX2", 65535));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("the values next to the private range are not private (32767, 34816)", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", 32767), row("a", "5f00:0:100:1:2::", "End", 34816)))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("private use 32768-34815 (RFC 8986 §10.2.1), a warning", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", 32768), row("a", "5f00:0:100:1:2::", "End", 33000), row("a", "5f00:0:100:1:3::", "End", 34815));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.severity, x.objects, x.location.row, x.data.codepoint, x.data.kind])).toEqual([
        [RULE, "warning", ["a", "5f00:0:100:1:1::"], 1, 32768, "private-use"],
        [RULE, "warning", ["a", "5f00:0:100:1:2::"], 2, 33000, "private-use"],
        [RULE, "warning", ["a", "5f00:0:100:1:3::"], 3, 34815, "private-use"],
      ]);
    });
    it("opaque on End and End.X, which the IGP advertises, not BGP", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", 65535), row("a", "5f00:0:100:1:1000::", "End.X", 65535), row("a", "5f00:0:100:1:1001::", "End.X", 65535)));
      expect(f.map((x) => [x.data.behavior, x.data.kind, x.data.count, x.location.row])).toEqual([
        ["End", "opaque-outside-bgp", 1, 1],
        ["End.X", "opaque-outside-bgp", 2, 2],
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
