import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "behavior-unknown";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, cp: number | "") => `${node},0,,${sid},${behavior},,${cp},,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan", () => {
      expect(lintPlanWith(RULE, smallPlan({ vrfs: [{ name: "v", pes: ["r1"] }] }))).toEqual([]);
    });
    it("the RFC 8986 names, and registered behaviours sidcarve does not plan (End.LBS, RFC 9800 §7; End.MAP, RFC 9433)", () => {
      const names = ["End", "End.X", "End.T", "End.DX2", "End.DX2V", "End.DX4", "End.DX6", "End.DT2U", "End.DT2M", "End.DT4", "End.DT6", "End.DT46", "End.B6.Encaps", "End.B6.Encaps.Red", "End.BM", "End.LBS", "End.MAP"];
      expect(lintCsvWith(RULE, csv(...names.map((n, i) => row("a", `5f00:0:100:1:${(i + 1).toString(16)}::`, n, ""))))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("misprints in published texts: End.B6.BM (RFC 8986 §8.4 Table 3) and End.DT64 (RFC 9513 §11)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", 1), row("a", "5f00:0:100:1:c000::", "End.B6.BM", 15), row("b", "5f00:0:100:2:4000::", "End.DT64", 20)));
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data.behavior, x.data.suggestion])).toEqual([
        [RULE, ["a", "5f00:0:100:1:c000::"], 2, "End.B6.BM", "End.BM"],
        [RULE, ["b", "5f00:0:100:2:4000::"], 3, "End.DT64", "End.DT46"],
      ]);
    });
    it("a name in the wrong case; a made-up name with a known codepoint; one with none", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "end.dt4", ""), row("a", "5f00:0:100:1:2::", "End.Decap4", 19), row("a", "5f00:0:100:1:3::", "End.Foo", "")));
      expect(f.map((x) => [x.data.behavior, x.data.suggestion])).toEqual([
        ["end.dt4", "End.DT4"],
        ["End.Decap4", "End.DT4"],
        ["End.Foo", undefined],
      ]);
    });
    it("one finding per node and name", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:2::", "End.Foo", ""), row("a", "5f00:0:100:1:1::", "End.Foo", ""), row("b", "5f00:0:100:2:1::", "End.Foo", "")));
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
