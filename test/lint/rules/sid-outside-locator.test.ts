import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "sid-outside-locator";

describe(RULE, () => {
  it("valid: every allocated SID is inside its node's locator", () => {
    expect(lintPlanWith(RULE, smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 16 } }] }))).toEqual([]);
  });
  it("invalid: RFC 8986 §3.3 example — 2001:db8:b:2:101:: is outside the advertised 2001:db8:b:1::/64", () => {
    // RFC 8986 §3.3: node N owns 2001:db8:b:1:100:: and 2001:db8:b:2:101::, only 2001:db8:b:1::/64 is advertised
    const t = csv("n,0,2001:db8:b:1::/64,2001:db8:b:1:100::,End,,1,0x100,48,16,16,0,", "n,0,2001:db8:b:1::/64,2001:db8:b:2:101::,End.X,,5,0x101,48,16,16,0,neighbor=m");
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.objects, x.location.row])).toEqual([[["n", "2001:db8:b:2:101::"], 2]]);
  });
  it("invalid: a SID under a locator of another algorithm (RFC 9352 §8)", () => {
    const t = csv("n,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "n,128,5f00:0:100:8001::/64,5f00:0:100:8001:1::,End,,1,0x1,48,16,16,0,", "n,128,5f00:0:100:8001::/64,5f00:0:100:1:2::,End.X,,5,0x2,48,16,16,0,neighbor=m");
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.objects[1], x.data.locatorAlgorithm])).toEqual([["5f00:0:100:1:2::", 0]]);
  });
  it("invalid: a table without a locator column — every SID is outside, the node has no locator", () => {
    const f = lintCsvWith(RULE, "node,sid,behavior\nb,5f00:0:100:2:1::,End\na,5f00:0:100:1:1::,End\n");
    expect(f.map((x) => [x.objects, x.location.row, x.message.endsWith("(the node has no locator)")])).toEqual([
      [["b", "5f00:0:100:2:1::"], 1, true],
      [["a", "5f00:0:100:1:1::"], 2, true],
    ]);
  });
  it("valid: a SID naming no locator lies in another row's locator of its node and algorithm", () => {
    expect(lintCsvWith(RULE, csv("n,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "n,0,,5f00:0:100:1:2::,End.X,,5,0x2,48,16,16,0,neighbor=m"))).toEqual([]);
  });
});
