/**
 * The packed CSV reader (src/sid/packed.ts) against the readable reference, readCsvTable: on
 * random tables both must give the same SIDs, locators, problems and line numbers.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { tableToCsv } from "../../src/emit/csv.js";
import { readCsvPacked } from "../../src/sid/packed.js";
import type { SidTable } from "../../src/sid/table.js";
import { readCsvTable } from "../../src/sid/table-read.js";
import { csvTableArb, plain } from "./arb.js";

const enc = new TextEncoder();

/** The bytes of text inside a larger buffer, at an odd offset (as a Buffer from Node's pool may be). */
function atOffset(text: string): Uint8Array {
  const b = enc.encode(text);
  const big = new Uint8Array(b.length + 8).fill(44);
  big.set(b, 5);
  return big.subarray(5, 5 + b.length);
}

function compare(text: string): { rows: number; problems: number } {
  const ref = readCsvTable(text);
  const fast = readCsvPacked(atOffset(text));
  expect(fast.unreadable).toBe(ref.unreadable);
  expect(fast.problems).toEqual(ref.problems);
  expect(plain(fast.table.toTable())).toEqual(plain(ref.table));
  const rows = ref.table.nodes.reduce((s, n) => s + n.sids.length, 0);
  expect(fast.table.count).toBe(rows);
  for (let r = -1; r <= rows + ref.problems.length + 2; r++) expect(fast.lineOf(r)).toBe(ref.lineOf?.(r));
  return { rows, problems: ref.problems.length };
}

describe("readCsvPacked agrees with readCsvTable", () => {
  it("on random tables, good rows and bad", () => {
    let rows = 0;
    let problems = 0;
    fc.assert(
      fc.property(csvTableArb, (text) => {
        const r = compare(text);
        rows += r.rows;
        problems += r.problems;
      }),
      { seed: 4180, numRuns: 1500 },
    );
    // the inputs exercise both paths
    expect(rows).toBeGreaterThan(3000);
    expect(problems).toBeGreaterThan(3000);
  });

  it("on hand-picked edge cases", () => {
    const head = "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context";
    const cases = [
      "",
      "\n\n",
      "# only a comment\n",
      head,
      head + "\n",
      head + "\r\n" + "a,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,\r\n",
      head + "\na,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,", // no final line break
      head + "\na,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,\r", // a lone CR at the end
      head + '\n"a,b",0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,"x=1"\n',
      head + '\na,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,"x=1\nmore"\nb,0,5f00::/64,5f00::2,End,,1,0x2,32,32,16,0,\n',
      head + '\na,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,"unclosed\n',
      head + '\na"b,0,5f00::/64,5f00::1,End,,1,0x1,32,32,16,0,\nc,0,5f00::/64,5f00::3,End,,1,0x3,32,32,16,0,\n',
      head + "\na,0,5f00::/64,5f00::1,End,,1,0x1,32,,16,0,\n", // three of four structure cells
      head + "\na,0,5f00::/64,5f00::1,End,,1,0x1,,,,,\n", // no structure
      "sid,behavior\n5f00::1,End\n", // no node column
      "node,sid,behavior,color\na,5f00::1,End,red\n", // an unknown column
      "node,sid,behavior,sid\na,5f00::1,End,5f00::2\n", // a column twice
      "\ufeffnode,sid,behavior\na,5f00::1,End\n".slice(1), // (the BOM itself is the CLI's business)
      "node,sid,behavior\n\u00a0a\u00a0,\u2003 5f00::1\u2003,End\n", // Unicode spaces at cell edges
      "node,sid,behavior,context\na,5f00::1,End,'=x=1\n", // a formula guard before the value
      "node,sid,behavior,context\na,5f00::1,End,'\t=1\n",
      "node,sid,behavior,function\na,5f00::1,End,0x" + "0".repeat(31) + "1\n",
      "node,sid,behavior,function\na,5f00::1,End,0x20000000000000\nb,5f00::2,End,9007199254740993\n", // beyond 2^53
      "node,sid,behavior\nb,5f00::2,End\na,5f00::1,End\nb,5f00::3,End\n", // nodes out of order
      "node,sid,behavior,locator\na,5f00::1,End,5f00::/64\na,5f00::2,End,5f00:0::/64\na,5f00::3,End,5f00::1/64\n", // one prefix written two ways, and host bits
    ];
    for (const c of cases) compare(c);
  });

  it("on cells with every kind of space String.prototype.trim removes, and near misses, at their edges", () => {
    // the reader trims on bytes; the reference trims the decoded text
    const spaces = [..."\t\n\v\f\r \u00a0\u1680\u2000\u2001\u2002\u2003\u2004\u2005\u2006\u2007\u2008\u2009\u200a\u2028\u2029\u202f\u205f\u3000\ufeff"];
    const others = [..."\u0085\u180e\u200b\u2060\ufffd\u00e9\u3001\u1681x'=-"].concat(["\u{1f600}", "\u{10000}"]);
    const pad = fc.array(fc.constantFrom(...spaces, ...spaces, ...others), { maxLength: 4 }).map((a) => a.join(""));
    const cell = (values: string[]) => fc.tuple(pad, fc.constantFrom(...values), pad).map(([a, v, b]) => (a + v + b).replace(/[\n\r"]/g, " "));
    const row = fc.tuple(
      cell(["tarn-p1", "fell-pe02", "", "'=x"]),
      cell(["5f00::1", "5f00:0:1:2:3::", "x"]),
      cell(["End", "End.X", ""]),
      cell(["", "PSP", "PSP+USD"]),
      cell(["", "vrf=blue", "k=v;k2=v2", "novalue"]),
      cell(["", "5f00::/64", "5f00:0:1::/48", "5f00::/129"]),
    );
    fc.assert(
      fc.property(fc.array(row, { maxLength: 12 }), (rows) => {
        const text = ["node,sid,behavior,flavors,context,locator", ...rows.map((r) => r.join(","))].join("\n");
        compare(text);
      }),
      { seed: 3629, numRuns: 600 },
    );
  });

  it("on a table sidcarve wrote itself", () => {
    const table: SidTable = readCsvTable(
      [
        "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context",
        "fell-p1,0,5f00:0:1:1::/64,5f00:0:1:1:1::,End,,1,0x1,48,16,16,0,",
        "fell-p1,0,5f00:0:1:1::/64,5f00:0:1:1:2::,End,PSP+USD,28,0x2,48,16,16,0,",
        "fell-p1,0,5f00:0:1:1::/64,5f00:0:1:1:1000::,End.X,PSP,6,0x1000,48,16,16,0,interface=port-1;neighbor=tarn-p1;protection=unprotected",
      ].join("\n"),
    ).table;
    compare(tableToCsv(table));
  });
});

describe("the packed table", () => {
  it("keeps entries once and gives them to every view", () => {
    const text = "node,sid,behavior,locator\nb,5f00::2,End,5f00::/64\na,5f00::1,End,5f00::/64\n";
    const p = readCsvPacked(enc.encode(text)).table;
    const t = p.toTable();
    expect(t).toBe(p.toTable());
    expect(t.nodes.map((n) => n.node)).toEqual(["a", "b"]);
    expect(p.entry(0)).toBe(t.nodes[1]!.sids[0]);
    expect(p.formatSid(1)).toBe("5f00::1");
    expect(p.nodeOf(1)).toBe("a");
    expect(p.locatorCount).toBe(2); // one locator per node, though the prefix is the same
    expect(p.prefixes).toHaveLength(1);
  });
});
