import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "structure-too-long";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");

/** A CSV row: node, SID, behaviour, flavours, codepoint, structure "block/node/function/argument", locator. */
const row = (node: string, sid: string, behavior: string, flavors: string, cp: number | "", st: string, locator = "") => `${node},0,${locator},${sid},${behavior},${flavors},${cp},,${st.split("/").join(",")},`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated classic plan", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("RFC 8986 §3.1: L=64, F=16, A=0 (80 bits) fits", () => {
      expect(lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", "", 5, "48/16/16/0", "2001:db8:bbbb:3::/64")))).toEqual([]);
    });
    it("exactly 128 bits fits", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End.X", "NEXT-CSID", 52, "48/16/16/48")))).toEqual([]);
    });
    it("a compressed block whose End.DT2M argument still fits", () => {
      const plan = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"], argument: 16 } }] });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("RFC 9352 §9 vector: LB 48 + LN 32 + F 32 + A 24 = 136 bits", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100::1:0:0", "End.DT2M", "", 24, "48/32/32/24")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["a", "5f00:0:100::1:0:0"], 1]]);
      expect(f[0]!.data).toMatchObject({ blockBits: 48, nodeBits: 32, functionBits: 32, argumentBits: 24, total: 136, count: 1 });
    });
    it("129 bits is one too many (RFC 8986 §3.1)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "", 1, "48/16/16/49")));
      expect(f.map((x) => x.data.total)).toEqual([129]);
    });
    it("one finding per node and structure, at the node's first such row", () => {
      const f = lintCsvWith(
        RULE,
        csv(
          row("a", "5f00:0:100:1::", "End", "", 1, "64/32/32/8"),
          row("a", "5f00:0:100:1:1::", "End", "", 1, "64/32/32/8"),
          row("a", "5f00:0:100:1:2::", "End.X", "", 5, "64/32/32/8"),
          row("b", "5f00:0:100:2::", "End", "", 1, "64/32/32/8"),
          row("b", "5f00:0:100:2:1::", "End", "", 1, "48/16/16/0"),
        ),
      );
      expect(f.map((x) => [x.objects[0], x.location.row, x.data.count])).toEqual([
        ["a", 1, 3],
        ["b", 4, 1],
      ]);
    });
    it("a NEXT-CSID block whose End.DT2M argument overflows (/96 + 16 + 16 + 16 = 144) is refused by the loader (RFC 8986 §3.1)", () => {
      const plan = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/96", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"], argument: 16 } }] });
      expect(() => lintPlanWith(RULE, plan)).toThrow(/blocks\[0\]\.compression.*144.*plan\/structure/);
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
