import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-pool-membership";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, st: string) => `${node},0,,${sid},${behavior},${flavors},,,${st.split("/").join(",")},`;
const nextPlan = (extra: Record<string, unknown> = {}) =>
  smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } }], ...extra });
const replacePlan = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xbfffffff"] } }] });

describe(RULE, () => {
  describe("valid", () => {
    it("allocated NEXT-CSID and REPLACE-CSID plans", () => {
      expect(lintPlanWith(RULE, nextPlan({ vrfs: [{ name: "v", pes: ["r1", "r3"] }] }))).toEqual([]);
      expect(lintPlanWith(RULE, replacePlan)).toEqual([]);
    });
    it("a table whose C-SIDs sit in the plan's pools; SIDs outside every compressed block are not judged", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"), row("a", "5f00:0:100:1:c000::", "End.X", "NEXT-CSID", "48/16/16/48"), row("a", "5f00:0:900:c001:1::", "End.X", "", "48/16/16/0"));
      expect(lintCsvWith(RULE, t, nextPlan())).toEqual([]);
    });
    it("needs a plan: a bare table is not judged", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:c001::", "End", "NEXT-CSID", "48/16/0/64")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a node C-SID from the LIB (0xc001), reported once for the node (RFC 9800 §5)", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"), row("b", "5f00:0:100:c001::", "End", "NEXT-CSID", "48/16/0/64"), row("b", "5f00:0:100:c001:c000::", "End.X", "NEXT-CSID", "48/16/16/48"));
      const f = lintCsvWith(RULE, t, nextPlan());
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["c", "b", "5f00:0:100:c001::"], 2]]);
      expect(f[0]!.data).toMatchObject({ block: "c", role: "node", value: "0xc001", pool: "0x1-0xbfff", count: 2 });
    });
    it("local C-SIDs outside the LIB (RFC 9800 §5.2, §9.2); a plain service under the node C-SID counts too", () => {
      const t = csv(row("a", "5f00:0:100:1:5::", "End.X", "NEXT-CSID", "48/16/16/48"), row("a", "5f00:0:100:1:6::", "End.DT4", "", "48/16/16/0"));
      const f = lintCsvWith(RULE, t, nextPlan());
      expect(f.map((x) => [x.data.node, x.data.role, x.data.value, x.data.count, x.location.row])).toEqual([["a", "local", "0x5", 2, 1]]);
    });
    it("a plan pinning an adjacency function outside the LIB is refused by the allocator before any lint", () => {
      expect(() => lintPlanWith(RULE, nextPlan({ links: [{ ends: [{ node: "r1", function: "0x0005" }, "r2"] }] }))).toThrow(/links\[0\]\.ends\[0\].*alloc\/pin/);
    });
    it("REPLACE-CSID one-C-SID layout: the whole 32-bit C-SID must be in the GIB (RFC 9800 §9.2)", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", "REPLACE-CSID", "48/16/16/48"), row("b", "5f00:0:100:c000:1::", "End", "REPLACE-CSID", "48/16/16/48"));
      const f = lintCsvWith(RULE, t, replacePlan);
      expect(f.map((x) => [x.data.node, x.data.role, x.data.value, x.location.row])).toEqual([["b", "csid", "0xc0000001", 2]]);
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
