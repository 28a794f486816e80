import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "trailing-bits";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, cp: number | "", st: string, locator = "") => `${node},0,${locator},${sid},${behavior},${flavors},${cp},,${st.split("/").join(",")},`;
const nextPlan = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("allocated classic and NEXT-CSID plans", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      expect(lintPlanWith(RULE, nextPlan)).toEqual([]);
    });
    it("RFC 8986 §3.2 example: 2001:db8:bbbb:3:100:: with L=64, F=16, A=0 has bits 80-127 zero", () => {
      expect(lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", "", 5, "48/16/16/0", "2001:db8:bbbb:3::/64")))).toEqual([]);
    });
    it("End.DT2M argument bits inside its 16-bit argument are not trailing bits", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:8001:ff::", "End.DT2M", "", 24, "48/16/16/16")))).toEqual([]);
    });
    it("RFC 9800 §5.3: 2001:db8:b1:10:: with End+NEXT-CSID, LBL 48, LNL 16, FL 0, AL 64", () => {
      expect(lintCsvWith(RULE, csv(row("n", "2001:db8:b1:10::", "End", "NEXT-CSID", 43, "48/16/0/64")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a bit after L+F+A (RFC 8986 §3.1: they MUST be zero)", () => {
      const f = lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", "", 5, "48/16/16/0"), row("r3", "2001:db8:bbbb:3:101::1", "End.X", "", 5, "48/16/16/0")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["r3", "2001:db8:bbbb:3:101::1"], 2]]);
      expect(f[0]!.data).toMatchObject({ kind: "trailing", usedBits: 80, count: 1 });
    });
    it("the first bit after the structure (bit 80 of 48/16/16/0) counts", () => {
      // bit 80 is the most significant bit of the sixth 16-bit group: 0x8000
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1:8000::", "End", "", 1, "48/16/16/0")));
      expect(f.map((x) => x.data.usedBits)).toEqual([80]);
    });
    it("a compressed SID advertised with argument bits set (RFC 9800 §8: Argument 0)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:c000:1::", "End.X", "NEXT-CSID", 52, "48/16/16/48")));
      expect(f.map((x) => [x.objects, x.data.kind, x.data.usedBits])).toEqual([[["a", "5f00:0:100:1:c000:1::"], "argument", 80]]);
    });
    it("a compressed SID whose row states argument 0 still needs zero bits after its function", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:c000:0:0:1", "End.X", "NEXT-CSID", 52, "48/16/16/0")));
      expect(f.map((x) => x.data.kind)).toEqual(["argument"]);
    });
    it("one finding per node and structure, with a few examples", () => {
      const rows = [];
      for (let i = 1; i <= 40; i++) rows.push(row("a", `5f00:0:100:1:${i.toString(16)}::1`, "End.X", "", 5, "48/16/16/0"));
      rows.push(row("b", "5f00:0:100:2:1::1", "End.X", "", 5, "48/16/16/0"));
      const f = lintCsvWith(RULE, csv(...rows));
      expect(f.map((x) => [x.objects[0], x.location.row, x.data.count])).toEqual([
        ["a", 1, 40],
        ["b", 41, 1],
      ]);
      expect(f[0]!.data.examples).toBe("5f00:0:100:1:1::1,5f00:0:100:1:2::1,5f00:0:100:1:3::1");
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
