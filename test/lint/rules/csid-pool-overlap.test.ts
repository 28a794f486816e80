import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-pool-overlap";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const nextPlan = (gib: string[], lib: string[]) => smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": gib, "local-pool": lib } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("disjoint pools, touching at the boundary", () => {
      expect(lintPlanWith(RULE, nextPlan(["0x0001-0xbfff"], ["0xc000-0xffff"]))).toEqual([]);
    });
    it("a classic plan has no C-SID pools", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("needs a plan: a bare table is not judged", () => {
      expect(lintCsvWith(RULE, csv("a,0,,5f00:0:100:1::,End,NEXT-CSID,43,,48,16,0,64,"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("GIB 0x0001-0xc0ff and LIB 0xc000-0xffff share 0xc000-0xc0ff (RFC 9800 §5: non-overlapping pools)", () => {
      const f = lintPlanWith(RULE, nextPlan(["0x0001-0xc0ff"], ["0xc000-0xffff"]));
      expect(f.map((x) => [x.rule, x.objects, x.location.path])).toEqual([[RULE, ["c"], ["blocks", 0, "compression", "local-pool", 0]]]);
      expect(f[0]!.data).toMatchObject({ gib: "0x1-0xc0ff", lib: "0xc000-0xffff", first: "0xc000", shared: 256 });
    });
    it("several ranges, two of them overlapping within the GIB: the shared values 0xd010-0xd01f are counted once", () => {
      const f = lintPlanWith(RULE, nextPlan(["0x0001-0x00ff", "0xd000-0xd00f", "0xd008-0xd01f"], ["0xc000-0xcfff", "0xd010-0xffff"]));
      expect(f.map((x) => [x.location.path, x.data.gib, x.data.lib, x.data.first, x.data.shared])).toEqual([[["blocks", 0, "compression", "local-pool", 1], "0xd008-0xd01f", "0xd010-0xffff", "0xd010", 16]]);
    });
    it("also reported when a table is linted with the plan", () => {
      const f = lintCsvWith(RULE, csv("a,0,,5f00:0:100:1::,End,NEXT-CSID,43,,48,16,0,64,"), nextPlan(["0x0001-0xc0ff"], ["0xc000-0xffff"]));
      expect(f.map((x) => x.objects)).toEqual([["c"]]);
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
