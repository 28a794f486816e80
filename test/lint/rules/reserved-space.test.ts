import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "reserved-space";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");
const block = (prefix: string, node = 16) => ({ blocks: [{ name: "b", prefix, structure: { node, function: 16, argument: 0 } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("a block inside 5f00::/16: the SRv6 row is more specific than 4000::/3 (Reserved by IETF)", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a block in the benchmarking range 2001:2::/48 (IANA special-purpose registry, RFC 5180)", () => {
      const f = lintPlanWith(RULE, smallPlan(block("2001:2::/48")));
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["b", "2001:2::/48", "2001:2::/48"], ["blocks", 0, "prefix"], { prefix: "2001:2::/48", subject: "block", range: "2001:2::/48", category: "benchmarking", count: 1 }],
      ]);
    });
    it("a block wider than 5f00::/16 reaches into IETF-reserved 4000::/3 (5e00::/15 = 5e00::/16 + 5f00::/16)", () => {
      const f = lintPlanWith(RULE, smallPlan(block("5e00::/15")));
      expect(f.map((x) => [x.data.range, x.data.category])).toEqual([["4000::/3", "reserved-by-ietf"]]);
    });
    it("a bare table in link-local space: one finding for the block its SIDs imply, not one per SID", () => {
      const t = csv("a,0,fe80:0:100:1::/64,fe80:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,0,fe80:0:100:1::/64,fe80:0:100:1:2::,End.X,,5,0x2,48,16,16,0,neighbor=b", "b,0,fe80:0:100:2::/64,fe80:0:100:2:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.data.subject, x.data.range])).toEqual([[["fe80:0:100::/48", "fe80::/10"], 1, "block", "fe80::/10"]]);
    });
    it("with a plan: a locator outside the blocks, and stray SIDs grouped per node and range", () => {
      const t = csv(
        "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
        "x,0,fe80::/64,fe80::1:0:0:0,End,,1,0x1,48,16,16,0,",
        "y,0,,::ffff:c000:201,End,,1,0x1,,,,,",
        "y,0,,::ffff:c000:202,End,PSP,2,0x2,,,,,",
      );
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => [x.objects, x.location.row, x.data.subject, x.data.range, x.data.count])).toEqual([
        [["x", "fe80::/64", "fe80::/10"], 2, "locator", "fe80::/10", 1],
        [["y", "::ffff:192.0.2.1", "::ffff:0:0/96"], 3, "sid", "::ffff:0:0/96", 2],
      ]);
    });
  });
});
