import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "infrastructure-collision";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errors = (fs: { severity: string }[]) => fs.filter((f) => f.severity === "error");
const infra = (...list: [string, string][]) => ({ infrastructure: list.map(([name, prefix]) => ({ name, prefix, kind: "link" })) });

describe(RULE, () => {
  describe("valid", () => {
    it("infrastructure beside the SID block", () => {
      expect(lintPlanWith(RULE, smallPlan(infra(["loops", "2001:db8:100::/48"], ["links", "5f00:0:101::/48"])))).toEqual([]);
    });
    it("the harbourline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8")))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no error", () => {
      expect(errors(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("an infrastructure prefix inside the block: one finding for the block, not per locator or SID (RFC 8986 §9)", () => {
      const f = lintPlanWith(RULE, smallPlan(infra(["links", "5f00:0:100::/56"])));
      expect(f.map((x) => [x.rule, x.objects, x.location.path, x.data])).toEqual([
        [RULE, ["b", "5f00:0:100::/48", "links", "5f00:0:100::/56"], ["blocks", 0, "prefix"], { subject: "block", prefix: "5f00:0:100::/48", infrastructure: "links", infrastructurePrefix: "5f00:0:100::/56", count: 1 }],
      ]);
    });
    it("an infrastructure prefix that holds the block", () => {
      const f = lintPlanWith(RULE, smallPlan(infra(["mgmt", "5f00::/32"])));
      expect(f.map((x) => [x.data.subject, x.data.infrastructure])).toEqual([["block", "mgmt"]]);
    });
    it("with a table: a locator outside the blocks and stray SIDs, each cause once", () => {
      const t = csv(
        "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
        "x,0,5f00:0:300:1::/64,5f00:0:300:1:1::,End,,1,0x1,48,16,16,0,",
        "y,0,,5f00:0:300:9:1::,End,,1,0x1,,,,,",
        "y,0,,5f00:0:300:9:2::,End,PSP,2,0x2,,,,,",
      );
      const f = lintCsvWith(RULE, t, smallPlan(infra(["cust", "5f00:0:300::/48"])));
      expect(f.map((x) => [x.objects[0], x.location.row, x.data.subject, x.data.count])).toEqual([
        ["x", 2, "locator", 1],
        ["y", 3, "sid", 2],
      ]);
    });
    it("the sweep pairs only what overlaps among many infrastructure prefixes", () => {
      const list: [string, string][] = [];
      for (let i = 1; i <= 40; i++) list.push([`link${i}`, `5f00:0:${(0x200 + i).toString(16)}::/48`]);
      list.push(["inside", "5f00:0:100:ff::/64"]);
      const f = lintPlanWith(RULE, smallPlan(infra(...list)));
      expect(f.map((x) => x.data.infrastructure)).toEqual(["inside"]);
    });
  });
});
