import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-block-length";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
// An info rule: the sample plans should not even need a note.
const findingsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8")));
const row = (node: string, sid: string, behavior: string, flavors: string, st: string) => `${node},0,,${sid},${behavior},${flavors},,,${st.split("/").join(",")},`;
const compressed = (prefix: string, compression: Record<string, unknown>) => smallPlan({ blocks: [{ name: "c", prefix, compression }] });
const next16 = { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] };
const replace16 = { flavor: "replace-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] };

describe(RULE, () => {
  describe("valid", () => {
    it("NEXT-CSID with a /32 block and 16-bit C-SIDs, the combination every node must support (RFC 9800 §4.1)", () => {
      expect(lintPlanWith(RULE, compressed("5f00:100::/32", next16))).toEqual([]);
    });
    it("REPLACE-CSID with the recommended 48, 56, 64, 72 and 80-bit blocks (RFC 9800 §4.2)", () => {
      for (const p of ["5f00:0:100::/48", "5f00:0:100::/56", "5f00:0:100::/64", "5f00:0:100::/72", "5f00:0:100::/80"]) expect(lintPlanWith(RULE, compressed(p, replace16))).toEqual([]);
    });
    it("classic plans and uncompressed table rows", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "", "44/20/16/0")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("NEXT-CSID with a /48 block: a note at the block prefix", () => {
      const f = lintPlanWith(RULE, compressed("5f00:0:100::/48", next16));
      expect(f.map((x) => [x.rule, x.severity, x.objects, x.location.path])).toEqual([[RULE, "info", ["c", "5f00:0:100::/48"], ["blocks", 0, "prefix"]]]);
      expect(f[0]!.data).toMatchObject({ flavor: "NEXT-CSID", blockBits: 48, csidBits: 16, kind: "next-not-32-16" });
    });
    it("REPLACE-CSID with a /60 block: not one of the recommended lengths", () => {
      const f = lintPlanWith(RULE, compressed("5f00:0:100::/60", replace16));
      expect(f.map((x) => [x.data.kind, x.data.blockBits, x.data.limit])).toEqual([["replace-not-recommended", 60, undefined]]);
    });
    it("table: REPLACE-CSID LBL 96 with LNFL 32 is beyond the limit 128 - 32 - 2 = 94 (RFC 9800 §4.2)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00::1", "End", "REPLACE-CSID", "96/32/0/0"), row("b", "5f00::2", "End", "REPLACE-CSID", "96/32/0/0")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data.kind, x.data.limit, x.data.count])).toEqual([[RULE, ["5f00::/96", "a", "5f00::1"], 1, "replace-limit", 94, 2]]);
    });
    it("table: REPLACE-CSID LBL 110 with LNFL 16 is beyond the limit 128 - 16 - 3 = 109", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00::1:0", "End", "REPLACE-CSID", "110/16/0/2")));
      expect(f.map((x) => [x.data.kind, x.data.limit])).toEqual([["replace-limit", 109]]);
    });
    it("table: one note per Locator-Block, flavour and C-SID length", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"), row("b", "5f00:0:100:2::", "End", "NEXT-CSID", "48/16/0/64"), row("c", "5f00:200::1:0:0", "End", "NEXT-CSID", "32/32/0/64"));
      expect(lintCsvWith(RULE, t).map((x) => [x.data.block, x.data.csidBits, x.data.count])).toEqual([
        ["5f00:0:100::/48", 16, 2],
        ["5f00:200::/32", 32, 1],
      ]);
    });
  });
  describe("sample plans", () => {
    it("harbourline-metro gets no finding", () => {
      expect(findingsOn(sample("harbourline-metro.yaml"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("tessaline-backbone (NEXT-CSID /32 blocks, 16-bit C-SIDs) gets no finding", () => {
      expect(findingsOn(TESSALINE)).toEqual([]);
    });
  });
});
