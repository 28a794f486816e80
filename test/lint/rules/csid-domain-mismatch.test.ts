import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "csid-domain-mismatch";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");
const errorsOn = (file: URL) => lintPlanWith(RULE, parse(readFileSync(file, "utf8"))).filter((f) => f.severity === "error");
const row = (node: string, sid: string, behavior: string, flavors: string, st: string) => `${node},0,,${sid},${behavior},${flavors},,,${st.split("/").join(",")},`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated NEXT-CSID plan: global C-SID alone and global + local share the 16-bit length", () => {
      const plan = smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } }] });
      expect(lintPlanWith(RULE, plan)).toEqual([]);
    });
    it("different flavours and lengths in different Locator-Blocks; uncompressed services under a NEXT-CSID block", () => {
      const t = csv(
        row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"),
        row("a", "5f00:0:100:1:d000::", "End.DT4", "", "48/16/16/0"),
        row("b", "5f00:0:200:0:2::", "End", "REPLACE-CSID", "48/32/0/48"),
      );
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
    it("RFC 9800 §6.4: a locator with a REPLACE-CSID End of node 16, function 0 makes its 16 + 16 SIDs 16-bit too", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "REPLACE-CSID", "48/16/0/64"), row("a", "5f00:0:100:1:c000::", "End.X", "REPLACE-CSID", "48/16/16/48"), row("b", "5f00:0:100:2::", "End", "REPLACE-CSID", "48/16/0/64"));
      expect(lintCsvWith(RULE, t)).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("NEXT-CSID and REPLACE-CSID SIDs under one Locator-Block (RFC 9800 §9.1), located at the odd one", () => {
      const t = csv(
        row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"),
        row("b", "5f00:0:100:2::", "End", "NEXT-CSID", "48/16/0/64"),
        row("c", "5f00:0:100:3::", "End", "REPLACE-CSID", "48/16/0/64"),
        row("d", "5f00:0:100:4::", "End", "NEXT-CSID", "48/16/0/64"),
      );
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.rule, x.objects, x.location.row])).toEqual([[RULE, ["5f00:0:100::/48", "c", "5f00:0:100:3::"], 3]]);
      expect(f[0]!.data).toMatchObject({ block: "5f00:0:100::/48", kind: "flavor", odd: "REPLACE-CSID", count: 1, values: "NEXT-CSID (3 SIDs), REPLACE-CSID (1 SID)" });
    });
    it("RFC 9800 §6.4: REPLACE-CSID 16-bit and 32-bit schemes under one block (node b's 16 + 16 SID has no 16-bit End)", () => {
      const t = csv(row("a", "5f00:0:100:1::", "End", "REPLACE-CSID", "48/16/0/64"), row("a", "5f00:0:100:1:c000::", "End.X", "REPLACE-CSID", "48/16/16/48"), row("b", "5f00:0:100:2:1::", "End", "REPLACE-CSID", "48/16/16/48"));
      const f = lintCsvWith(RULE, t);
      expect(f.map((x) => [x.data.kind, x.data.odd, x.data.node, x.location.row])).toEqual([["csid-length", 32, "b", 3]]);
    });
    it("SIDs that state a /56 block inside the /48 the others state (RFC 9800 §6.3, §6.4): one finding for the pair of block prefixes", () => {
      const t = csv(
        row("a", "5f00:0:100:1::", "End", "NEXT-CSID", "48/16/0/64"),
        row("a", "5f00:0:100:2::", "End", "NEXT-CSID", "48/16/0/64"),
        row("c", "5f00:0:100:4::", "End", "NEXT-CSID", "48/16/0/64"),
        row("b", "5f00:0:100:3::", "End", "NEXT-CSID", "56/16/0/56"),
        row("b", "5f00:0:100:3:c000::", "End.X", "NEXT-CSID", "56/16/16/40"),
      );
      const f = lintCsvWith(RULE, t);
      // located at the smaller side (2 SIDs of b against 3)
      expect(f.map((x) => [x.data.kind, x.data.block, x.data.other, x.data.node, x.data.count, x.location.row])).toEqual([["block-length", "5f00:0:100::/48", "5f00:0:100::/56", "b", 2, 4]]);
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
