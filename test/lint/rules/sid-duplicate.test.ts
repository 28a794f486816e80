import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "sid-duplicate";

describe(RULE, () => {
  it("valid: an allocated plan has every SID once", () => {
    expect(lintPlanWith(RULE, smallPlan({ vrfs: [{ name: "v", pes: ["r1", "r3"] }] }))).toEqual([]);
  });
  it("valid: anycast members share the SIDs of the anycast locator (RFC 9352 §6)", () => {
    const plan = smallPlan({
      anycast: [{ name: "edge", place: "quay" }],
      nodes: [
        { name: "r1", place: "quay", anycast: ["edge"] },
        { name: "r2", place: "quay", anycast: ["edge"] },
        { name: "r3", place: "mill" },
      ],
    });
    expect(lintPlanWith(RULE, plan)).toEqual([]);
  });
  it("invalid: the same SID on two nodes", () => {
    const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,");
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.objects, x.location.row])).toEqual([[["a", "b", "5f00:0:100:1:1::"], 2]]);
  });
  it("invalid: the same SID twice on one node", () => {
    const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End.X,,5,0x1,48,16,16,0,neighbor=b");
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.objects, x.location.row, x.data.count])).toEqual([[["a", "5f00:0:100:1:1::"], 2, 2]]);
  });
  it("invalid: the same SID on two nodes, the later node name first in the file: located at the second node's row", () => {
    const t = csv("b,0,5f00:0:100:2::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,");
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.objects, x.location.row])).toEqual([[["a", "b", "5f00:0:100:1:1::"], 1]]);
  });
});
