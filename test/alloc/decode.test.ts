/**
 * The decoder against the allocation it was built from: every SID of the sample plans decodes back
 * to its own node, behaviour and locator, and the locator it names contains the address by the
 * reading of an outside library (ipaddr.js).
 */
import ipaddr from "ipaddr.js";
import { describe, expect, it } from "vitest";
import { Decoder } from "../../src/alloc/decode.js";
import { formatAddr } from "../../src/net/text.js";
import { alloc, planFile } from "../helpers/plans.js";

for (const sample of ["sample-plans/harbourline-metro.yaml", "sample-plans/tessaline-backbone.yaml"]) {
  describe(`decode every SID of ${sample}`, () => {
    const a = alloc(planFile(sample));
    const d = new Decoder(a);
    it("finds each SID's behaviour and an owner that holds it", () => {
      let checked = 0;
      for (const n of a.table.nodes) {
        for (const s of n.sids) {
          const r = d.decode(s.sid);
          expect(r.sid?.behavior, formatAddr(s.sid)).toBe(s.behavior);
          expect(r.note).toBe("SID of the plan");
          expect(r.owners.some((o) => o === n.node || o.startsWith(`${n.node} (anycast`)), `${formatAddr(s.sid)} owners ${r.owners.join(",")}`).toBe(true);
          // ipaddr.js (an outside reference) agrees that the named locator contains the SID
          const [net, len] = ipaddr.parseCIDR(r.locator!);
          expect(ipaddr.parse(r.address).match(net, len)).toBe(true);
          checked++;
        }
      }
      expect(checked).toBeGreaterThan(50);
    });
    it("names the groups of each level on the way", () => {
      const s = a.table.nodes[0]!.sids[0]!;
      const r = d.decode(s.sid);
      const groups = r.levels.map((l) => l.group).filter((g) => g !== undefined);
      expect(groups.length).toBe(a.plan.levels.length - 1);
      expect(a.table.nodes[0]!.node).toBeTruthy();
    });
  });
}

describe("decode addresses that are not SIDs", () => {
  const a = alloc(planFile("sample-plans/harbourline-metro.yaml"));
  const d = new Decoder(a);
  it("says so for an address outside every block", () => {
    expect(d.decode(0x20010db8n << 96n).note).toBe("the address is in none of the plan's blocks");
  });
  it("finds the SID under a non-zero function-free tail as trailing bits", () => {
    const s = a.table.nodes[0]!.sids.find((x) => x.behavior === "End")!;
    const r = d.decode(s.sid | 1n);
    expect(r.sid?.behavior).toBe("End");
    expect(r.note).toMatch(/bits set after its argument/);
  });
});
