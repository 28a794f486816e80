import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "codepoint-mismatch";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, cp: number | "") => `${node},0,,${sid},${behavior},${flavors},${cp},,48,16,16,0,`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan", () => {
      expect(lintPlanWith(RULE, smallPlan({ "end-sids": [{ flavors: [] }, { flavors: ["PSP", "USD"] }], vrfs: [{ name: "v", pes: ["r1"] }] }))).toEqual([]);
    });
    it("IANA SRv6 Endpoint Behaviors values: End 1, End PSP 2, End.X 5, End.DT46 20, End NEXT-CSID 43, End.X PSP NEXT-CSID 53, End.DT2M REPLACE-CSID 124", () => {
      const t = csv(
        row("a", "5f00:0:100:1:1::", "End", "", 1),
        row("a", "5f00:0:100:1:2::", "End", "PSP", 2),
        row("a", "5f00:0:100:1:3::", "End.X", "", 5),
        row("a", "5f00:0:100:1:4::", "End.DT46", "", 20),
        row("a", "5f00:0:100:1:5::", "End", "NEXT-CSID", 43),
        row("a", "5f00:0:100:1:6::", "End.X", "PSP+NEXT-CSID", 53),
        row("a", "5f00:0:100:1:7::", "End.DT2M", "REPLACE-CSID", 124),
      );
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("reserved, unassigned, private-use and opaque values are left to their own rules", () => {
      const t = csv(row("a", "5f00:0:100:1:1::", "End", "", 0), row("a", "5f00:0:100:1:2::", "End", "", 98), row("a", "5f00:0:100:1:3::", "End", "", 33000), row("a", "5f00:0:100:1:4::", "End.DT4", "", 65535));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("rows without a codepoint, or whose flavours or behaviour cannot be read", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", "", ""), row("a", "5f00:0:100:1:2::", "End", "XSP", 5), row("a", "5f00:0:100:1:3::", "End.Foo", "", 5)))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("End.X advertised with 6, the codepoint of End.X with PSP (RFC 8986 §3.2: End.X is 5)", () => {
      const f = lintCsvWith(RULE, csv(row("r3", "2001:db8:bbbb:3:100::", "End.X", "", 5), row("r3", "2001:db8:bbbb:3:101::", "End.X", "", 6)));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["r3", "2001:db8:bbbb:3:101::"], 2]]);
      expect(f[0]!.data).toMatchObject({ behavior: "End.X", codepoint: 6, expected: 5, means: "End.X with PSP" });
    });
    it("End.X PSP with NEXT-CSID advertised with 52 (plain End.X with NEXT-CSID); it is 53", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:c100::", "End.X", "PSP+NEXT-CSID", 52)));
      expect(f.map((x) => [x.data.expected, x.data.means])).toEqual([[53, "End.X with NEXT-CSID"]]);
    });
    it("a value registered for a behaviour sidcarve does not plan (40, End.MAP, RFC 9433)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:1::", "End", "", 40)));
      expect(f.map((x) => [x.data.expected, x.data.means])).toEqual([[1, "End.MAP"]]);
    });
    it("one finding per node, behaviour, flavours and codepoint", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:4000::", "End.DT4", "", 18), row("a", "5f00:0:100:1:4001::", "End.DT4", "", 18), row("b", "5f00:0:100:2:4000::", "End.DT4", "", 18)));
      expect(f.map((x) => [x.data.node, x.data.count, x.data.expected, x.location.row])).toEqual([
        ["a", 2, 19, 1],
        ["b", 1, 19, 3],
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
