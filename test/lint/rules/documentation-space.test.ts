import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "documentation-space";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const docBlock = (prefix: string) => ({ blocks: [{ name: "doc", prefix, structure: { node: 16, function: 16, argument: 0 } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("a 5f00::/16 block; documentation prefixes used only as infrastructure are not SID space", () => {
      expect(lintPlanWith(RULE, smallPlan({ infrastructure: [{ name: "loops", prefix: "2001:db8:100::/48" }] }))).toEqual([]);
    });
    it("3fff:1000::/48 is outside 3fff::/20 (RFC 9637: 3fff:: to 3fff:fff:ffff:...)", () => {
      expect(lintCsvWith(RULE, csv("a,0,3fff:1000:0:1::/64,3fff:1000:0:1:1::,End,,1,0x1,48,16,16,0,"))).toEqual([]);
    });
    it("the harbourline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a block in 2001:db8::/32 (RFC 3849), one finding for the block", () => {
      const f = lintPlanWith(RULE, smallPlan(docBlock("2001:db8:100::/48")));
      expect(f.map((x) => [x.rule, x.severity, x.objects, x.location.path, x.data])).toEqual([
        [RULE, "warning", ["doc", "2001:db8:100::/48", "2001:db8::/32"], ["blocks", 0, "prefix"], { prefix: "2001:db8:100::/48", subject: "block", range: "2001:db8::/32", count: 1, production: "false" }],
      ]);
    });
    it("a plan marked for production makes it an error (RFC 9637 §4: not for routed production traffic)", () => {
      const f = lintPlanWith(RULE, smallPlan({ ...docBlock("2001:db8:100::/48"), lint: { production: true } }));
      expect(f.map((x) => [x.data.production, x.severity])).toEqual([["true", "error"]]);
      // an explicit severity in the plan wins over the rule's own escalation
      const g = lintPlanWith(RULE, smallPlan({ ...docBlock("2001:db8:100::/48"), lint: { production: true, severity: { "documentation-space": "info" } } }));
      expect(g.map((x) => x.severity)).toEqual(["info"]);
    });
    it("a bare table in 3fff::/20 (RFC 9637), located at the first row of the implied block", () => {
      const t = csv("a,0,3fff:100:0:1::/64,3fff:100:0:1:1::,End,,1,0x1,48,16,16,0,", "b,0,3fff:100:0:2::/64,3fff:100:0:2:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.objects, x.location.row, x.data.range])).toEqual([[["3fff:100::/48", "3fff::/20"], 1, "3fff::/20"]]);
    });
  });
});
