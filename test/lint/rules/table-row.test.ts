import { describe, expect, it } from "vitest";
import { CSV_HEAD, csv, lintCsvWith } from "../harness.js";

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
