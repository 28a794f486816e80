import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "argument-use";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, cp: number | "", st: string) => `${node},0,,${sid},${behavior},${flavors},${cp},,${st.split("/").join(",")},`;
const bridge = { "l2-services": [{ name: "market", kind: "bridge", nodes: ["r1", "r3"] }] };

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan without bridges", () => {
      expect(lintPlanWith(RULE, smallPlan({ vrfs: [{ name: "v", pes: ["r1", "r3"] }] }))).toEqual([]);
    });
    it("a bridge in a block that gives End.DT2M argument bits", () => {
      const plan = smallPlan({ ...bridge, blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 16, function: 16, argument: 16 } }] });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("End.DT2M with Arg.FE2 bits and End.DT4 without (RFC 8986 §4.12; RFC 9252 §3.2.1)", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:8001::", "End.DT2M", "", 24, "48/16/16/16"), row("a", "5f00:0:100:1:4000::", "End.DT4", "", 19, "48/16/16/0")))).toEqual([]);
    });
    it("compressed SIDs advertise the rest as argument (RFC 9800 §8: LBL 48, LNL 16, FL 16, AL 48)", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:c001::", "End.X", "NEXT-CSID", 52, "48/16/16/48"), row("a", "5f00:0:100:1:4000::", "End.DT4", "REPLACE-CSID", 119, "48/16/16/48")))).toEqual([]);
    });
    it("unknown behaviours are left to behavior-unknown", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End.Foo", "", "", "48/16/16/16")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("End.DT4 with argument bits (RFC 9252 §3.2.1: AL must be 0)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", "", 1, "48/16/16/0"), row("a", "5f00:0:100:1:4000::", "End.DT4", "", 19, "48/16/16/16")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["a", "5f00:0:100:1:4000::"], 2]]);
      expect(f[0]!.data).toMatchObject({ behavior: "End.DT4", argumentBits: 16, kind: "unexpected", count: 1 });
    });
    it("End.DT2M without argument bits (RFC 8986 §4.12: Arg.FE2)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:8001::", "End.DT2M", "", 24, "48/16/16/0")));
      expect(f.map((x) => [x.objects, x.data.kind])).toEqual([[["a", "5f00:0:100:1:8001::"], "missing"]]);
    });
    it("a plan with a bridge in a block with no argument bits: one finding for the block", () => {
      const f = lintPlanWith(RULE, smallPlan(bridge));
      expect(f.map((x) => [x.rule, x.objects[0], x.location.path, x.data.kind, x.data.count])).toEqual([[RULE, "b", ["blocks", 0, "structure"], "missing", 2]]);
    });
    it("per node and behaviour in a table", () => {
      const f = lintCsvWith(
        RULE,
        csv(row("a", "5f00:0:100:1:4000::", "End.DT4", "", 19, "48/16/16/8"), row("a", "5f00:0:100:1:4001::", "End.DT4", "", 19, "48/16/16/8"), row("a", "5f00:0:100:1:1000::", "End.X", "PSP", 6, "48/16/16/8"), row("b", "5f00:0:100:2:4000::", "End.DT4", "", 19, "48/16/16/8")),
      );
      expect(f.map((x) => [x.data.node, x.data.behavior, x.data.count, x.location.row])).toEqual([
        ["a", "End.DT4", 2, 1],
        ["a", "End.X", 1, 3],
        ["b", "End.DT4", 1, 4],
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
