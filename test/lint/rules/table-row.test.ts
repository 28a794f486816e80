import { describe, expect, it } from "vitest";
import { CSV_HEAD, csv, lintCsvWith, lintJsonWith } from "../harness.js";

const RULE = "table-row";

describe(RULE, () => {
  it("valid: a well-formed table", () => {
    expect(lintCsvWith(RULE, csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,"))).toEqual([]);
  });
  it("invalid: bad address, bad algorithm, wrong cell count — each with row and column; good rows still read", () => {
    const t = csv(
      "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
      "a,0,5f00:0:100:1::/64,5f00:0:100:1:zz::,End,,1,0x1,48,16,16,0,",
      "a,300,5f00:0:100:1::/64,5f00:0:100:1:2::,End,,1,0x2,48,16,16,0,",
      "a,0,5f00:0:100:1::/64",
      "b,0,5f00:0:100:2::/64,5f00:0:100:2:1::,End,,1,0x1,48,16,16,0,",
    );
    const f = lintCsvWith(RULE, t);
    expect(f.map((x) => [x.location.row, x.location.field])).toEqual([
      [2, "sid"],
      [3, "algorithm"],
      [4, undefined],
    ]);
  });
  it("invalid: a missing required column is reported on the header", () => {
    const f = lintCsvWith(RULE, "node,sid\na,5f00::1\n");
    expect(f.map((x) => [x.location.row, x.location.field])).toEqual([[0, "behavior"]]);
  });
  it("invalid: an unclosed quote", () => {
    const f = lintCsvWith(RULE, `${CSV_HEAD}\na,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,"neighbor=b\n`);
    expect(f).toHaveLength(1);
    expect(f[0]!.location.row).toBe(1);
  });
});

describe(`${RULE} (JSON tables)`, () => {
  const table = (codepoint: unknown) => ({
    schema: "sidcarve/sid-table/v1",
    plan: "t",
    nodes: [{ node: "a", locators: [], sids: [{ sid: "5f00:0:100:1:1::", behavior: "End", codepoint }] }],
  });
  it("valid: a codepoint in 0..65535 (IANA SRv6 Endpoint Behaviors codepoints are 16 bits)", () => {
    expect(lintJsonWith(RULE, table(1))).toEqual([]);
    expect(lintJsonWith(RULE, table(65535))).toEqual([]);
  });
  it("invalid: a codepoint outside 0..65535 or not a whole number is a row problem, as in CSV", () => {
    for (const bad of [65536, -1, 1.5, "12"]) {
      const f = lintJsonWith(RULE, table(bad));
      expect(f.map((x) => x.location.field), String(bad)).toEqual(["nodes[0].sids[0].codepoint"]);
    }
  });
});
