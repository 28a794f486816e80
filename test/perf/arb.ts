/**
 * Random SID tables as CSV text for the fast-path tests: mostly well-formed rows, with every kind
 * of cell the reader must judge (bad addresses, numbers out of range, quoting, spaces, formula
 * guards, missing and extra columns, blank lines, CR LF and stray CR, unclosed quotes). Invented
 * names only; addresses from 5f00::/16 (RFC 9602) and 2001:db8::/32 (RFC 3849).
 */
import fc from "fast-check";
import type { SidTable } from "../../src/sid/table.js";

const COLUMNS = ["node", "algorithm", "locator", "sid", "behavior", "flavors", "codepoint", "function", "block_bits", "node_bits", "function_bits", "argument_bits", "context"] as const;
type Column = (typeof COLUMNS)[number];

/** Mostly one of the good values, now and then one of the odd ones. */
const pick = (good: fc.Arbitrary<string>, odd: readonly string[]) => fc.oneof({ weight: 25, arbitrary: good }, { weight: 1, arbitrary: fc.constantFrom(...odd) });

const nodes = pick(fc.constantFrom("tarn-p1", "tarn-pe01", "fell-pe02", "gorse-rr1", "Zed-P9", "wick-pe03"), ["", " spaced ", "'=sum", "'-minus", "\u00a0nbsp-pe\u00a0", "café-pe1"]);
const sids = pick(
  fc.tuple(fc.integer({ min: 0, max: 3 }), fc.integer({ min: 1, max: 6 }), fc.integer({ min: 0, max: 0xffff })).map(([a, b, f]) => `5f00:0:${a}:${b}:${f.toString(16)}::`),
  ["5F00:0:1:2:1::", "5f00:0000:0001:0002:0001:0000:0000:0000", "5f00::1", "::ffff:192.0.2.1", "2001:db8::7", " 5f00:0:1:1:1:: ", "'=5f00::1", "5f00:zz::1", "5f00::1::2", "192.0.2.1", "5f00::1/128", "5f00::1%eth0", "[5f00::1]", "", "5f00:0:1:2:3:4:5:6:7", "'\t5f00::9"],
);
const algorithms = pick(fc.constantFrom("0", "128", "129", ""), ["256", "-1", "abc", " 128 ", "0128", "1.0"]);
const locators = pick(
  fc.tuple(fc.integer({ min: 0, max: 3 }), fc.integer({ min: 1, max: 6 })).map(([a, b]) => `5f00:0:${a}:${b}::/64`),
  ["5f00:0:1::/48", "5f00:0:1:1::1/64", "5f00:0:0001:1::/64", "", "5f00::/129", "5f00::", "nonsense/64", "5f00:0:1:1::/64 "],
);
const behaviors = pick(fc.constantFrom("End", "End.X", "End.DT4", "End.DT6", "End.DT46", "End.DX2", "End.DT2M"), ["End.Bogus", "", " End ", "end.x"]);
const flavors = pick(fc.constantFrom("", "PSP", "PSP+USD", "NEXT-CSID"), ["USD+PSP", " PSP + USD ", "PSP+", "+", "BAD"]);
const codepoints = pick(fc.constantFrom("", "1", "5", "57", "65535"), ["65536", "-3", "x", "007", "123456"]);
const functions = pick(fc.constantFrom("", "0x1", "0x1000", "0X1f", "16", "0"), ["0x", "0xg", "0x123456789abcdef0", "0x" + "f".repeat(32), "0x" + "f".repeat(33), "9".repeat(39), "9".repeat(40), "12345678901234567", "-1", "1e3"]);
const bits = pick(fc.constantFrom("32", "16", "0", "128"), ["", "129", "x", " 16 "]);
const contexts = pick(fc.constantFrom("", "neighbor=tarn-p1;interface=port-1;protection=both;link=a--b", "vrf=blue;family=ipv4", "bridge-domain=bd1", "k=v;k2=v2"), ["a=1;", "=x", "novalue", " k = v ", "x=1;;y=2", "vrf=café"]);

const cellOf: Record<Column, fc.Arbitrary<string>> = {
  node: nodes,
  algorithm: algorithms,
  locator: locators,
  sid: sids,
  behavior: behaviors,
  flavors,
  codepoint: codepoints,
  function: functions,
  block_bits: bits,
  node_bits: bits,
  function_bits: bits,
  argument_bits: bits,
  context: contexts,
};

/** A cell as written in the file: mostly plain, sometimes quoted (with doubled quotes), sometimes broken. */
function writeCell(v: string, mode: number): string {
  switch (mode) {
    case 1:
      return `"${v.replace(/"/g, '""')}"`;
    case 2:
      return `"${v},x"`; // a comma inside quotes
    case 3:
      return `"${v}\n"`; // a line break inside quotes
    case 4:
      return `${v}"`; // a quote inside an unquoted field
    case 5:
      return `"a""b"${v}`; // text after a closing quote
    default:
      return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
  }
}

const cellMode = fc.oneof({ weight: 40, arbitrary: fc.constant(0) }, { weight: 2, arbitrary: fc.constant(1) }, { weight: 1, arbitrary: fc.integer({ min: 2, max: 5 }) });

/** A header: the usual columns in a random order, sometimes without optional ones, rarely broken. */
const ALL: string[] = [...COLUMNS];
export const headerArb: fc.Arbitrary<string[]> = fc.oneof(
  { weight: 10, arbitrary: fc.constant(ALL) },
  { weight: 4, arbitrary: fc.shuffledSubarray(ALL, { minLength: 3 }).filter((h) => h.includes("node") && h.includes("sid") && h.includes("behavior")) },
  { weight: 1, arbitrary: fc.shuffledSubarray(ALL, { minLength: 1 }).map((h) => [...h, "extra"]) },
  { weight: 1, arbitrary: fc.constant<string[]>(["node", "sid", "behavior", "sid"]) },
  { weight: 1, arbitrary: fc.constant<string[]>([" node ", "sid ", "behavior", "context"]) },
);

/** Random CSV table text. */
export const csvTableArb: fc.Arbitrary<string> = fc
  .tuple(
    headerArb,
    fc.array(fc.tuple(fc.array(fc.nat(), { minLength: 14, maxLength: 14 }), fc.nat({ max: 99 }), fc.array(cellMode, { minLength: 14, maxLength: 14 })), { maxLength: 40 }),
    fc.constantFrom("\n", "\r\n", "\r\n", "\n"),
    fc.boolean(),
    fc.nat({ max: 99 }),
  )
  .chain(([header, rows, eol, banner, tail]) => {
    const cellArbs = header.map((h) => (COLUMNS as readonly string[]).includes(h.trim()) ? cellOf[h.trim() as Column] : fc.constantFrom("", "x", "1"));
    return fc.tuple(fc.constant(header), fc.array(fc.tuple(...cellArbs.map((a) => a)), { minLength: rows.length, maxLength: rows.length }), fc.constant(rows), fc.constant(eol), fc.constant(banner), fc.constant(tail));
  })
  .map(([header, values, rows, eol, banner, tail]) => {
    const lines: string[] = [];
    if (banner) lines.push("# sidcarve SID table, plan p. Caution: invented test data.");
    lines.push(header.join(","));
    values.forEach((vals, r) => {
      const [, shape, modes] = rows[r]!;
      let cells = (vals as string[]).map((v, k) => writeCell(v, modes[k] ?? 0));
      if (shape < 3) cells = cells.slice(0, -1); // too few cells
      else if (shape < 5) cells = [...cells, "extra"]; // too many
      if (shape === 7) lines.push(""); // a blank line
      if (shape === 8) lines.push(cells.join(",") + "\r" + cells.join(",")); // a stray CR mid-line
      else lines.push(cells.join(","));
    });
    let text = lines.join(eol) + (tail < 80 ? eol : "");
    if (tail === 99) text += '"an unclosed quote,';
    return text;
  });

/** A table as plain data (prefixes as text), so that two readers' tables compare field by field. */
export function plain(t: SidTable) {
  return {
    plan: t.plan,
    nodes: t.nodes.map((n) => ({
      node: n.node,
      locators: n.locators.map((l) => ({ prefix: l.prefix.format(), algorithm: l.algorithm, block: l.block, anycast: l.anycast })),
      sids: n.sids.map((s) => ({
        sid: s.sid,
        behavior: s.behavior,
        flavors: [...s.flavors],
        codepoint: s.codepoint,
        algorithm: s.algorithm,
        locator: s.locator?.format(),
        function: s.function,
        structure: s.structure ? { ...s.structure } : undefined,
        context: { ...s.context },
        key: s.key,
        row: s.row,
      })),
    })),
  };
}

