import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-length";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, st: string) => `${node},0,,${sid},${behavior},${flavors},,,${st.split("/").join(",")},`;
const compressed = (compression: Record<string, unknown>, extra: Record<string, unknown> = {}) => smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression }], ...extra });
const wideLevels = { levels: [{ name: "site", bits: 16 }, { name: "router", bits: 16, reserved: [0] }] };

describe(RULE, () => {
  describe("valid", () => {
    it("allocated plans: NEXT-CSID 16, REPLACE-CSID 16 (two C-SIDs), REPLACE-CSID 32 with a 16-bit node field (one C-SID)", () => {
      expect(lintPlanWith(RULE, compressed({ flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] }))).toEqual([]);
      expect(lintPlanWith(RULE, compressed({ flavor: "replace-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] }))).toEqual([]);
      expect(lintPlanWith(RULE, compressed({ flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xffffffff"] }))).toEqual([]);
    });
    it("RFC 9800 §5.3 examples: global alone (LNL 16, FL 0), local alone (LNL 0, FL 16), combined 16 + 16; REPLACE-CSID LNL 16 + FL 16", () => {
      const t = csv(
        row("n1", "2001:db8:b1:10::", "End", "NEXT-CSID", "48/16/0/64"),
        row("n1", "2001:db8:b1:f123::", "End.X", "NEXT-CSID", "48/0/16/64"),
        row("n1", "2001:db8:b1:10:f123::", "End.X", "NEXT-CSID", "48/16/16/48"),
        row("n2", "2001:db8:b2:20:1::", "End", "REPLACE-CSID", "48/16/16/48"),
        row("n2", "2001:db8:b2:20:123::", "End.X", "REPLACE-CSID", "48/16/16/48"),
      );
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("32-bit C-SIDs (RFC 9800 §4.2 Figure 5: LBL 48, LNFL 32); two 32-bit NEXT-CSID C-SIDs", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "REPLACE-CSID", "48/32/0/48"), row("b", "5f00:0:200:0:2:c000:1::", "End.X", "NEXT-CSID", "48/32/32/16")))).toEqual([]);
    });
    it("uncompressed SIDs are not judged", () => {
      expect(lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "PSP", "48/24/0/0")))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("a 24-bit NEXT-CSID node C-SID (RFC 9800 §4.1: 16 or 32 bits)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/24/0/56"), row("a", "5f00:0:100:2::", "End", "NEXT-CSID", "48/16/0/64")));
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["a", "5f00:0:100:1::"], 1]]);
      expect(f[0]!.data).toMatchObject({ flavor: "NEXT-CSID", nodeBits: 24, functionBits: 0, csidLength: 24, count: 1 });
    });
    it("NEXT-CSID node 16 + function 8 makes one 24-bit C-SID", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:1:c0::", "End.X", "NEXT-CSID", "48/16/8/56")));
      expect(f.map((x) => x.data.csidLength)).toEqual([24]);
    });
    it("REPLACE-CSID node 32 + function 32: LNFL 64, and only 16 + 16 reads as two C-SIDs (RFC 9800 §6.4)", () => {
      const f = lintCsvWith(RULE, csv(row("a", "5f00:0:100:0:1::", "End", "REPLACE-CSID", "48/32/0/48"), row("a", "5f00:0:100:0:1:c000:0:1", "End.X", "REPLACE-CSID", "48/32/32/16")));
      expect(f.map((x) => [x.objects[1], x.data.csidLength, x.location.row])).toEqual([["5f00:0:100:0:1:c000:0:1", 64, 2]]);
    });
    it("a plan cannot even make REPLACE-CSID 32-bit C-SIDs with a whole C-SID of node bits (LNFL 64): the loader refuses it", () => {
      // RFC 9800 §6.4 reads no compression scheme from node 32 + function 32.
      const plan = compressed({ flavor: "replace-csid", "csid-bits": 32, "node-bits": 32, "global-pool": ["0x00000001-0xbfffffff"], "local-pool": ["0xc0000000-0xffffffff"] }, wideLevels);
      expect(() => lintPlanWith(RULE, plan)).toThrow(/compression\.node-bits.*plan\/structure/);
    });
    it("one finding per node and structure", () => {
      const rows = [];
      for (let i = 1; i <= 30; i++) rows.push(row("a", `5f00:0:100:1:c${i.toString(16).padStart(3, "0")}::`, "End.X", "NEXT-CSID", "48/16/12/52"));
      const f = lintCsvWith(RULE, csv(...rows));
      expect(f.map((x) => [x.data.node, x.data.count, x.data.csidLength, x.location.row])).toEqual([["a", 30, 28, 1]]);
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
