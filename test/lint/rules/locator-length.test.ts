import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "locator-length";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, cp: number | "", st: string, locator: string) => `${node},0,${locator},${sid},${behavior},,${cp},,${st.split("/").join(",")},`;

describe(RULE, () => {
  describe("valid", () => {
    it("allocated plans: classic and REPLACE-CSID with a node field shorter than the C-SID", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
      const replace = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xffffffff"] } }] });
      expect(lintPlanWith(RULE, replace)).toEqual([]);
    });
    it("RFC 8986 §3.2: block 2001:db8:bbbb::/48, locator 2001:db8:bbbb:3::/64, LB 48 + LN 16", () => {
      expect(lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", 5, "48/16/16/0", "2001:db8:bbbb:3::/64")))).toEqual([]);
    });
    it("rows without a locator or a structure are not judged", () => {
      expect(lintCsvWith(RULE, "node,sid,behavior,locator\na,5f00:0:100:1:1::,End,5f00:0:100::/40\n")).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a /56 locator for SIDs stating LB 48 + LN 16 (RFC 8986 §3.1: L = LB + LN)", () => {
      const f = lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", 5, "48/16/16/0", "2001:db8:bbbb::/56"), row("r3", "2001:db8:bbbb:3:101::", "End.X", 5, "48/16/16/0", "2001:db8:bbbb::/56")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["r3", "2001:db8:bbbb::/56"], 1]]);
      expect(f[0]!.data).toMatchObject({ locatorLength: 56, blockBits: 48, nodeBits: 16, expected: 64, count: 2 });
    });
    it("each locator of each node is its own finding", () => {
      const f = lintCsvWith(
        RULE,
        csv(row("a", "5f00:0:100:1:1::", "End", 1, "48/16/16/0", "5f00:0:100:1::/64"), row("a", "5f00:0:100:1:8000::", "End", 1, "48/8/16/0", "5f00:0:100:1::/64"), row("b", "5f00:0:100:2:1::", "End", 1, "40/16/16/0", "5f00:0:100:2::/64")),
      );
      expect(f.map((x) => [x.objects, x.data.expected, x.location.row])).toEqual([
        [["a", "5f00:0:100:1::/64"], 56, 2],
        [["b", "5f00:0:100:2::/64"], 56, 3],
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
