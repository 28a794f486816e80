import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintJsonWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "host-bits";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, locator: string) => `${node},0,${locator},${sid},End,,1,,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan", () => {
      expect(lintPlanWith(RULE, smallPlan())).toEqual([]);
    });
    it("locators written as their network address", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "5f00:0:100:1::/64"), row("b", "5f00:0:100:2:1::", "5f00:0:100:2::/64")))).toEqual([]);
    });
    it("RFC 5952 §7 / RFC 4291 §2.3: 2001:db8:0:cd30::/60 is a clean /60", () => {
      expect(lintCsvWith(RULE, csv(row("a", "2001:db8:0:cd30::1", "2001:db8:0:cd30::/60")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("RFC 4291 §2.3: 2001:0DB8::CD30/60 does not expand to the intended /60 (its bits sit after the length)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "2001:db8::cd31", "2001:0DB8::CD30/60")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.location.field])).toEqual([[RULE, ["a", "2001:db8::cd30/60"], 1, "locator"]]);
      expect(f[0]!.data).toMatchObject({ node: "a", locator: "2001:db8::cd30/60", masked: "2001:db8::/60" });
    });
    it("one finding per locator, at its first row", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:2::", "5f00:0:100:1::1/64"), row("a", "5f00:0:100:1:1::", "5f00:0:100:1::1/64"), row("b", "5f00:0:100:2:1::", "5f00:0:100:2::/64")));
      expect(f.map((x) => [x.objects, x.location.row])).toEqual([[["a", "5f00:0:100:1::1/64"], 1]]);
    });
    it("a JSON table: a locator in a node's list and a SID's own locator", () => {
      const table = {
        schema: "sidcarve/sid-table/v1",
        plan: "t",
        nodes: [
          { node: "a", locators: [{ prefix: "5f00:0:100:1:8000::/64", algorithm: 0 }], sids: [] },
          { node: "b", locators: [], sids: [{ sid: "5f00:0:100:2:1::", behavior: "End", locator: "5f00:0:100:2::2/64" }] },
        ],
      };
      const f = lintJsonWith(RULE, table);
      expect(f.map((x) => [x.objects, x.location.row])).toEqual([
        [["a", "5f00:0:100:1:8000::/64"], undefined],
        [["b", "5f00:0:100:2::2/64"], 1],
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
