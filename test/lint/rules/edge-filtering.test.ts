import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "edge-filtering";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const block = (prefix: string) => ({ blocks: [{ name: "b", prefix, structure: { node: 16, function: 16, argument: 0 } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("a documentation block gets no edge note (documentation-space speaks for it)", () => {
      expect(lintPlanWith(RULE, smallPlan(block("2001:db8:100::/48")))).toEqual([]);
    });
    it("the harbourline sample plan: one info note for its 5f00::/16 block, no error", () => {
      const f = lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"));
      expect(f.map((x) => [x.severity, x.objects, x.data.category])).toEqual([["info", ["metro", "5f00:0:4800::/48", "5f00::/16"], "srv6-sid"]]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan: one info note per block, no error", () => {
      const f = lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"));
      expect(f.map((x) => [x.severity, x.objects[0], x.data.category])).toEqual([
        ["info", "core", "srv6-sid"],
        ["info", "low-latency", "srv6-sid"],
      ]);
    });
  });
  describe("invalid (notes)", () => {
    it("a block in 5f00::/16: fine, but filter at the edge (RFC 9602 §5-7); once per block, not per SID", () => {
      const f = lintPlanWith(RULE, smallPlan({ vrfs: [{ name: "v", pes: ["r1", "r3"] }] }));
      expect(f.map((x) => [x.rule, x.severity, x.objects, x.location.path, x.data])).toEqual([
        [RULE, "info", ["b", "5f00:0:100::/48", "5f00::/16"], ["blocks", 0, "prefix"], { prefix: "5f00:0:100::/48", subject: "block", range: "5f00::/16", category: "srv6-sid", count: 1 }],
      ]);
    });
    it("a unique-local block (RFC 4193)", () => {
      const f = lintPlanWith(RULE, smallPlan(block("fd12:3456:789a::/48")));
      expect(f.map((x) => [x.data.range, x.data.category])).toEqual([["fc00::/7", "unique-local"]]);
    });
    it("a bare table in global unicast space: one note for its implied block (RFC 8754 §5.1)", () => {
      // 3fff:1000:: lies outside 3fff::/20, in plain 2000::/3.
      const t = csv("a,0,3fff:1000:0:1::/64,3fff:1000:0:1:1::,End,,1,0x1,48,16,16,0,", "b,0,3fff:1000:0:2::/64,3fff:1000:0:2:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.data.range, x.data.category])).toEqual([[["3fff:1000::/48", "2000::/3"], 1, "2000::/3", "global-unicast"]]);
    });
  });
});
