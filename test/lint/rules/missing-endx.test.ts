import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { csv, lintCsvWith, lintPlanWith, smallPlan } from "../harness.js";

const RULE = "missing-endx";
const sample = (name: string) => new URL(`../../../sample-plans/${name}`, import.meta.url);
const TESSALINE = sample("tessaline-backbone.yaml");

const endx = (node: string, n: number, nb: string, algo = 0, extra = "") => `${node},${algo},5f00:0:100:${n}::/64,5f00:0:100:${n}:${(0x1000 + n * 16 + nb.length).toString(16)}::,End.X,,5,0x1,48,16,16,0,neighbor=${nb}${extra}`;

describe(RULE, () => {
  describe("valid", () => {
    it("an allocated plan has End.X SIDs on both ends of every link", () => {
      expect(lintPlanWith(RULE, smallPlan({ links: [{ ends: ["r1", "r2"], protection: "both" }, { ends: ["r2", "r3"] }] }))).toEqual([]);
    });
    it("a table whose links have End.X SIDs on both ends; a node missing from the inventory is not judged", () => {
      const t = csv(endx("r1", 1, "r2"), endx("r2", 2, "r1"), endx("r2", 2, "r3"));
      expect(lintCsvWith(RULE, t, smallPlan())).toEqual([]);
    });
    it("the harbourline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(sample("harbourline-metro.yaml"), "utf8"))).toEqual([]);
    });
    it.skipIf(!existsSync(TESSALINE))("the tessaline sample plan has no finding", () => {
      expect(lintPlanWith(RULE, readFileSync(TESSALINE, "utf8"))).toEqual([]);
    });
  });
  describe("invalid", () => {
    it("one end of a link without an End.X SID towards its neighbour", () => {
      const t = csv(endx("r1", 1, "r2"), endx("r2", 2, "r1"), endx("r3", 3, "r2"));
      const f = lintCsvWith(RULE, t, smallPlan());
      expect(f.map((x) => [x.rule, x.objects, x.location.row, x.data])).toEqual([[RULE, ["r2", "r3", "r2--r3"], 2, { link: "r2--r3", node: "r2", neighbor: "r3", algorithms: "0", count: 1 }]]);
    });
    it("an End.X SID on another interface is not this link's", () => {
      const plan = smallPlan({ links: [{ ends: [{ node: "r1", interface: "east" }, { node: "r2", interface: "west" }] }] });
      const t = csv(endx("r1", 1, "r2", 0, ";interface=south"), endx("r2", 2, "r1", 0, ";interface=west"), "r3,0,5f00:0:100:3::/64,5f00:0:100:3:1::,End,,1,0x1,48,16,16,0,");
      const f = lintCsvWith(RULE, t, plan);
      expect(f.map((x) => [x.data.node, x.data.neighbor])).toEqual([["r1", "r2"]]);
    });
    it("a Flex-Algo link with End.X SIDs for algorithm 0 only (RFC 9350 §14.2)", () => {
      const flex = smallPlan({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }] });
      const t = csv(endx("r1", 1, "r2"), endx("r2", 2, "r1"), endx("r2", 2, "r3"), endx("r3", 3, "r2"), endx("r3", 3, "r2", 128));
      const f = lintCsvWith(RULE, t, flex);
      expect(f.map((x) => [x.data.link, x.data.node, x.data.algorithms])).toEqual([
        ["r1--r2", "r1", "128"],
        ["r1--r2", "r2", "128"],
        ["r2--r3", "r2", "128"],
      ]);
    });
    it("a plan link that carries Flex-Algo 128 to a node outside algorithm 128, located at that link end", () => {
      const plan = smallPlan({
        algorithms: [{ id: 0 }, { id: 128 }],
        blocks: [{ name: "b", prefix: "5f00:0:100::/48", algorithms: [0, 128], "algorithm-bits": 1, structure: { node: 17, function: 15 } }],
        nodes: [
          { name: "r1", place: "quay", algorithms: [0] },
          { name: "r2", place: "quay" },
          { name: "r3", place: "mill" },
        ],
        links: [{ ends: ["r1", "r2"], algorithms: [0, 128] }],
      });
      // the allocator refuses such a plan outright; the rule still catches it in inventories (above)
      expect(() => lintPlanWith(RULE, plan)).toThrow(/links\[0\]\.ends\[0\].*alloc\/algorithm/);
    });
  });
});
