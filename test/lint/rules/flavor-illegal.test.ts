import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "flavor-illegal";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string) => `${node},0,,${sid},${behavior},${flavors},,,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("allocated plans with PSP/USD End SIDs and NEXT-CSID", () => {
      expect(lintPlanWith(RULE, smallPlan({ "end-sids": [{ flavors: [] }, { flavors: ["PSP", "USD"] }], "adjacency-flavors": ["PSP"] }))).toEqual([]);
    });
    it("flavours the registry has: End PSP+USP+USD, End.X PSP with NEXT-CSID, End.DT4 with REPLACE-CSID, old spelling next-c-sid", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", "PSP+USP+USD"), row("a", "5f00:0:100:1:2::", "End.X", "PSP+NEXT-CSID"), row("a", "5f00:0:100:1:3::", "End.DT4", "REPLACE-CSID"), row("a", "5f00:0:100:1:4::", "End.T", "usd+next-c-sid"));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("an unknown behaviour with known flavours is left to behavior-unknown", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End.Foo", "PSP")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("PSP on End.DT4 (RFC 8986 §4.16: PSP, USP, USD only on End, End.X, End.T)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", "PSP"), row("a", "5f00:0:100:1:4000::", "End.DT4", "PSP")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["a", "5f00:0:100:1:4000::"], 2]]);
      expect(f[0]!.data).toMatchObject({ behavior: "End.DT4", flavors: "PSP", kind: "illegal", count: 1 });
    });
    it("NEXT-CSID on End.DT6 (RFC 9800 defines only REPLACE-CSID for it) and both C-SID flavours on End", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:4000::", "End.DT6", "NEXT-CSID"), row("b", "5f00:0:100:2:1::", "End", "NEXT-CSID+REPLACE-CSID")));
      expect(f.map((x) => [x.data.node, x.data.behavior, x.data.kind])).toEqual([
        ["a", "End.DT6", "illegal"],
        ["b", "End", "illegal"],
      ]);
    });
    it("an unknown flavour name", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", "PSP+XSP")));
      expect(f.map((x) => [x.objects, x.data.kind, x.data.unknown])).toEqual([[["a", "5f00:0:100:1:1::"], "unknown-flavor", "XSP"]]);
    });
    it("unknown flavours in a table with only the flavour column: one finding per node and unknown names, at the first row", () => {
      const f = lintCsvWith(RULE, "node,sid,behavior,flavors\nb,5f00:0:100:2:1::,End.X,xsp\na,5f00:0:100:1:2::,End,PSP+XSP\na,5f00:0:100:1:1::,End.X,XSP+psp\n");
      expect(f.map((x) => [x.objects, x.data.unknown, x.data.count, x.location.row])).toEqual([
        [["b", "5f00:0:100:2:1::"], "xsp", 1, 1],
        [["a", "5f00:0:100:1:2::"], "XSP", 2, 2],
      ]);
    });
    it("one finding per node, behaviour and flavour set, whatever the spelling order", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:4000::", "End.DT4", "PSP+USD"), row("a", "5f00:0:100:1:4001::", "End.DT4", "USD+PSP"), row("a", "5f00:0:100:1:4002::", "End.DT4", "USD")));
      expect(f.map((x) => [x.data.flavors, x.data.count, x.location.row])).toEqual([
        ["PSP+USD", 2, 1],
        ["USD", 1, 3],
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
