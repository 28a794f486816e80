import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-zero";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, st: string) => `${node},0,,${sid},${behavior},${flavors},,,${st.split("/").join(",")},`;
const nextPlan = (extra: Record<string, unknown> = {}) =>
  smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } }], ...extra });

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated NEXT-CSID plan", () => {
      expect(lintPlanWith(RULE, nextPlan())).toEqual([]);
    });
    it("non-zero C-SIDs; a one-C-SID REPLACE-CSID SID whose node half is 0 but whose C-SID is not", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"), row("a", "5f00:0:100:1:c000::", "End.X", "NEXT-CSID", "48/16/16/48"), row("b", "5f00:0:100:0:1::", "End", "REPLACE-CSID", "48/16/16/48"));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("an uncompressed SID with a zero node field is not a C-SID", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:0:1::", "End", "", "48/16/16/0")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("node C-SID 0 (RFC 9800 §5: 0 is reserved, it ends a container)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"), row("z", "5f00:0:100::", "End", "NEXT-CSID", "48/16/0/64")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data.role])).toEqual([[RULE, ["z", "5f00:0:100::"], 2, "node"]]);
    });
    it("local C-SID 0 after a node C-SID (two-C-SID layout), and a local C-SID 0 advertised alone", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:0::", "End.X", "NEXT-CSID", "48/16/16/48"), row("b", "5f00:0:100::", "End.X", "NEXT-CSID", "48/0/16/64")));
      expect(f.map((x) => [x.data.node, x.data.role, x.location.row])).toEqual([
        ["a", "local", 1],
        ["b", "local", 2],
      ]);
    });
    it("REPLACE-CSID: a 32-bit C-SID of 0, and a 16-bit scheme (RFC 9800 §6.4) whose local C-SID is 0", () => {
      const f = lintCsvWith(
        RULE,
        csv(row("a", "5f00:0:100::", "End", "REPLACE-CSID", "48/32/0/48"), row("b", "5f00:0:100:2::", "End", "REPLACE-CSID", "48/16/0/64"), row("b", "5f00:0:100:2::", "End.X", "REPLACE-CSID", "48/16/16/48")),
      );
      expect(f.map((x) => [x.data.node, x.data.role])).toEqual([
        ["a", "node"],
        ["b", "local"],
      ]);
    });
    it("a plan that pins an adjacency's local C-SID to 0 is refused by the allocator (RFC 9800 §5)", () => {
      expect(() => lintPlanWith(RULE, nextPlan({ links: [{ ends: [{ node: "r1", function: 0 }, "r2"] }] }))).toThrow(/links\[0\]\.ends\[0\].*alloc\/pin/);
    });
    it("a SID whose node and local C-SIDs are both 0 is in both findings", () => {
      const f = lintCsvWith(RULE, csv(row("z", "5f00:0:100:1:0::", "End.X", "NEXT-CSID", "48/16/16/48"), row("z", "5f00:0:100::", "End.X", "NEXT-CSID", "48/16/16/48")));
      expect(f.map((x) => [x.data.role, x.data.count, x.location.row, x.data.examples])).toEqual([
        ["local", 2, 1, "5f00:0:100::,5f00:0:100:1::"],
        ["node", 1, 2, "5f00:0:100::"],
      ]);
    });
    it("one finding per node and role", () => {
      const f = lintCsvWith(RULE, csv(row("z", "5f00:0:100::", "End", "NEXT-CSID", "48/16/0/64"), row("z", "5f00:0:100:0:c000::", "End.X", "NEXT-CSID", "48/16/16/48"), row("z", "5f00:0:100:0:c001::", "End.X", "NEXT-CSID", "48/16/16/48")));
      expect(f.map((x) => [x.data.role, x.data.count, x.location.row])).toEqual([["node", 3, 1]]);
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
