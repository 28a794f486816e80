/**
 * The rules ported to the packed table give the findings of their readable reference (the object
 * rules, test/lint/reference/) to the letter: on random CSV tables read both ways, random JSON
 * tables (anycast and block names on locators, SIDs naming unlisted locators), tables that repeat a
 * node name, tables linted with a plan, and allocated plans.
 *
 * Compared: all twenty rules of test/lint/reference/index.ts; each one's check changed in the port
 * (object views to ctx.packed), so each reference keeps its old check and takes its metadata from
 * the real rule. Rules of this area with no reference here are the ones that were not ported or
 * whose check did not change (table-row, waiver-expired, csid-pool-overlap read no SID views).
 */
import { readFileSync } from "node:fs";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parse } from "yaml";
import { allocate } from "../../src/alloc/allocate.js";
import { inputFromPacked, runLint } from "../../src/lint/engine.js";
import { inputFromAllocation, inputFromTable } from "../../src/lint/input.js";
import { ruleById } from "../../src/lint/rules/index.js";
import type { LintInput, Report, Rule, RuleContext } from "../../src/lint/types.js";
import type { Plan } from "../../src/plan/model.js";
import { readCsvPacked } from "../../src/sid/packed.js";
import type { SidTable } from "../../src/sid/table.js";
import { readCsvTable, readJsonTable } from "../../src/sid/table-read.js";
import { TODAY, loadPlan, smallPlan } from "./harness.js";
import { REFERENCE_RULES } from "./reference/index.js";

const PAIRS: [Rule, Rule][] = REFERENCE_RULES.map((r) => [ruleById(r.meta.id)!, r]);

/** The reports of one rule in the order it made them (or the error thrown), as text. */
function run(input: () => LintInput, rule: Rule): string {
  const reports: Report[] = [];
  // the rule sees the engine's context, with report() also recording the order
  const recording: Rule = {
    meta: rule.meta,
    check: (ctx) =>
      rule.check(
        Object.create(ctx, {
          report: {
            value: (r: Report) => {
              reports.push(r);
              ctx.report(r);
            },
          },
        }) as RuleContext,
      ),
  };
  try {
    runLint(input(), [recording]);
    return JSON.stringify(reports, null, 1);
  } catch (e) {
    return `throws ${(e as Error).message}`;
  }
}

/** Every ported rule against its reference on the inputs; the first difference fails with both texts. */
/** `objects`: an input that came as objects (its packed view is made by packTable). */
function same(inputs: { name: string; make: () => LintInput; objects?: boolean }[]): void {
  for (const [ported, reference] of PAIRS) {
    for (const { name, make } of inputs) {
      const want = run(make, reference);
      const got = run(make, ported);
      if (got !== want) expect({ rule: ported.meta.id, input: name, got }).toEqual({ rule: ported.meta.id, input: name, got: want });
    }
    // the ported rule must not need the object views of a packed input
    for (const { make, objects } of inputs) if (!objects) expect(runLint(make(), [ported]).objectViewsMade).toBe(false);
  }
}

// ------------------------------------------------------------------ random CSV tables

const pick = <T>(xs: readonly T[]) => fc.constantFrom(...xs);
const NODES = ["a", "b", "c", "a2"];
const LOCATORS = ["", "5f00:0:100:1::/64", "5f00:0:100::/48", "5f00:0:100:1::1/64", "5f00:0:100:2::/64", "5f00:0:100::/56", "2001:db8::/32", "5f00:0:100:1::/60", "5f00:0:100::/40"];
const BEHAVIORS = ["End", "End.X", "End.DT4", "End.DT2M", "End.DX4", "end.x", "End.B6.BM", "Bogus", "End.DT46", "End.MAP"];
const FLAVORS = ["", "PSP", "psp", "PSP+USD", "NEXT-CSID", "next-c-sid", "REPLACE-CSID", "NEXT-CSID+REPLACE-CSID", "FOO", "PSP+FOO", "USD+PSP"];
const CODEPOINTS = ["", "0", "1", "2", "5", "25", "29", "43", "9999", "33000", "40000", "65535", "13"];
const FUNCTIONS = ["", "0x1", "99999999999999999", "0x1fffffffffffffffff", "12"];
const STRUCTURES = ["", "48/16/16/0", "48/16/0/64", "48/16/16/48", "48/0/16/64", "48/32/0/48", "45/19/16/0", "48/16/16/64", "64/64/16/0", "32/16/16/0", "48/8/8/0", "48/24/0/0", "120/8/0/0", "64/0/0/64", "0/16/16/0", "48/16/16/16", "40/24/16/0"];
const ALGORITHMS = ["", "0", "1", "5", "128"];
const PREFIXES = ["5f00:0:100", "5f00:0:100", "5f00:0:101", "2001:db8:0"];
const HEX16 = ["0", "1", "2", "c000", "ffff", "8"];

// addresses from a few pieces (a /48, node, function, argument, low bits), and some often repeated
const sidText = fc.oneof(
  fc.tuple(pick(PREFIXES), pick(HEX16), pick(HEX16), pick(HEX16), fc.oneof(fc.constant(""), pick(["1", "8000", "ff"]))).map(([p, n, f, a, tail]) => `${p}:${n}:${f}:${a}:${tail === "" ? "0" : tail}:0`),
  pick(["5f00:0:100:1:1::", "5f00:0:100:1::", "5f00:0:100:2:c000::", "5f00:0:101:1:1::"]),
);

const row = fc
  .record({
    node: pick(NODES),
    algorithm: pick(ALGORITHMS),
    locator: pick(LOCATORS),
    sid: sidText,
    behavior: pick(BEHAVIORS),
    flavors: pick(FLAVORS),
    codepoint: pick(CODEPOINTS),
    function: pick(FUNCTIONS),
    structure: pick(STRUCTURES),
    context: pick(["", "", "vrf=v"]),
  })
  .map((r) => {
    const [b, n, f, a] = r.structure === "" ? ["", "", "", ""] : r.structure.split("/");
    return { ...r, block_bits: b!, node_bits: n!, function_bits: f!, argument_bits: a! };
  });

const COLUMNS = ["node", "algorithm", "locator", "sid", "behavior", "flavors", "codepoint", "function", "block_bits", "node_bits", "function_bits", "argument_bits", "context"] as const;
const OPTIONAL = new Set(["algorithm", "locator", "flavors", "codepoint", "function", "context"]);

/** A table: rows, and the columns it has (the structure columns all or none). */
const table = fc.record({
  rows: fc.array(row, { minLength: 1, maxLength: 24 }),
  drop: fc.subarray([...OPTIONAL, "structure"]),
});

function csvText(t: { rows: Record<(typeof COLUMNS)[number], string>[]; drop: string[] }): string {
  const cols = COLUMNS.filter((c) => !t.drop.includes(c) && !(t.drop.includes("structure") && c.endsWith("_bits")));
  return [cols.join(","), ...t.rows.map((r) => cols.map((c) => r[c]).join(","))].join("\n") + "\n";
}

const csvInputs = (text: string, plan?: Plan) => [
  { name: "csv objects", make: () => inputFromTable(readCsvTable(text), "t.csv", TODAY, plan), objects: true },
  { name: "csv packed", make: () => inputFromPacked(readCsvPacked(new TextEncoder().encode(text)), "t.csv", TODAY, plan) },
];

/** A plan for tables linted with intent: compressed blocks with pools, anycast groups, nodes a, b, c. */
const intent = loadPlan(
  smallPlan({
    blocks: [
      { name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } },
      { name: "r", prefix: "5f00:0:101::/48", compression: { flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xbfffffff"] } },
    ],
    anycast: [{ name: "edge", place: "quay" }],
    nodes: [
      { name: "a", place: "quay", anycast: ["edge"] },
      { name: "b", place: "quay", anycast: ["edge"] },
      { name: "c", place: "mill" },
    ],
    links: [{ ends: ["a", "b"] }, { ends: ["b", "c"] }],
  }),
);

describe("ported rules give the findings of the object rules", () => {
  it("on random CSV tables, read both ways", () => {
    fc.assert(
      fc.property(table, (t) => {
        same(csvInputs(csvText(t)));
      }),
      { numRuns: 100 },
    );
  });

  it("on random CSV tables linted with a plan (pools, anycast groups)", () => {
    fc.assert(
      fc.property(table, (t) => {
        same(csvInputs(csvText(t), intent));
      }),
      { numRuns: 50 },
    );
  });

  it("on random JSON tables: anycast and block names, unlisted locators, any integer values, a node name given twice", () => {
    const locator = fc.record({ prefix: pick(LOCATORS.filter((l) => l !== "")), algorithm: pick([0, 1, 5, 128]), anycast: pick(["", "", "edge"]), block: pick(["", "c", "r", "nosuch"]) });
    const sid = fc.record({
      sid: sidText,
      behavior: pick(BEHAVIORS),
      locator: fc.option(pick(LOCATORS.filter((l) => l !== "")), { nil: undefined }),
      flavors: fc.array(pick(["PSP", "usd", "NEXT-CSID", "REPLACE-CSID", "a+b", "", "x"]), { maxLength: 3 }),
      codepoint: fc.option(pick([0, 1, 5, 29, 33000, 65535, 9999]), { nil: undefined }),
      algorithm: pick([0, 1, 5, 128, 300, -3]),
      function: pick(["0x1", "99999999999999999999", "0x1fffffffffffffffff"]),
      structure: fc.option(pick(STRUCTURES.filter((s) => s !== "")), { nil: undefined }).map((s) => {
        if (!s) return undefined;
        const [block, node, fn, argument] = s.split("/").map(Number);
        return { block, node, function: fn, argument };
      }),
    });
    const node = fc.record({ node: pick(NODES), locators: fc.array(locator, { maxLength: 3 }), sids: fc.array(sid, { maxLength: 8 }) });
    fc.assert(
      fc.property(fc.array(node, { minLength: 1, maxLength: 5 }), fc.boolean(), (nodes, withPlan) => {
        const read = readJsonTable(JSON.stringify({ schema: "sidcarve/sid-table/v1", plan: "t", nodes }));
        // the same table with its first node split in two entries of one name (a SidTable may do that)
        const n0 = read.table.nodes[0];
        const split: SidTable = n0
          ? { plan: "t", nodes: [{ node: n0.node, locators: n0.locators.slice(0, 1), sids: n0.sids.filter((_, k) => k % 2 === 0) }, { node: n0.node, locators: n0.locators.slice(1), sids: n0.sids.filter((_, k) => k % 2 === 1) }, ...read.table.nodes.slice(1)] }
          : read.table;
        const plan = withPlan ? intent : undefined;
        same([
          { name: "json", make: () => inputFromTable(read, "t.json", TODAY, plan), objects: true },
          { name: "json, a node name twice", make: () => inputFromTable({ ...read, table: split }, "t.json", TODAY, plan), objects: true },
        ]);
      }),
      { numRuns: 100 },
    );
  });

  it("on named edges: no locator, structure or codepoint column; one SID making two groups; rows out of address order", () => {
    const head = "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context";
    const tables = [
      // no locator column: every SID is outside its node's (missing) locators
      ["node,sid,behavior,codepoint", "b,5f00:0:100:2:1::,End,1", "a,5f00:0:100:1:1::,End.X,5", "a,5f00:0:100:1:1::,End,9999"],
      // no structure and no codepoint column
      ["node,algorithm,locator,sid,behavior,flavors", "a,5,5f00:0:100:1::1/64,5f00:0:100:1:1::,End,psp+FOO", "b,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,NEXT-CSID"],
      // one SID whose node and local C-SIDs are 0, after a SID (earlier in the file, later by address) whose local C-SID alone is 0
      [head, "z,0,,5f00:0:100:1:0::,End.X,NEXT-CSID,,,48,16,16,48,", "z,0,,5f00:0:100::,End.X,NEXT-CSID,,,48,16,16,48,", "z,0,,5f00:0:101::,End.X,REPLACE-CSID,,,48,16,16,48,"],
      // rows out of address order over two nodes, function values above 2^53, the same SID on both nodes
      [head, "b,0,5f00:0:100:2::/64,5f00:0:100:2:8::1,End,,1,99999999999999999999,48,16,16,0,", "a,0,5f00:0:100:1::/64,5f00:0:100:1:9::1,End,,1,0x1fffffffffffffffff,48,16,16,0,", "a,0,5f00:0:100:1::/64,5f00:0:100:2:8::1,End.X,,5,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:1:1::1,End,,1,0x1,48,16,16,0,"],
    ];
    for (const rows of tables) {
      const text = rows.join("\n") + "\n";
      same(csvInputs(text));
      same(csvInputs(text, intent));
    }
  });

  it("on allocated plans: the samples and compressed plans", () => {
    const plans = [
      parse(readFileSync(new URL("../../sample-plans/harbourline-metro.yaml", import.meta.url), "utf8")),
      smallPlan({ vrfs: [{ name: "v", pes: ["r1", "r3"] }] }),
      smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } }], vrfs: [{ name: "v", pes: ["r1", "r3"] }] }),
      smallPlan({ blocks: [{ name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "replace-csid", "csid-bits": 32, "node-bits": 16, "global-pool": ["0x00010000-0xbfffffff"] } }] }),
      smallPlan({
        anycast: [{ name: "edge", place: "quay" }],
        nodes: [
          { name: "r1", place: "quay", anycast: ["edge"] },
          { name: "r2", place: "quay", anycast: ["edge"] },
          { name: "r3", place: "mill" },
        ],
      }),
    ];
    for (const obj of plans) {
      const r = allocate(loadPlan(obj), undefined);
      if (!r.ok) throw new Error("allocation failed");
      same([{ name: "plan", make: () => inputFromAllocation(r.allocation, TODAY), objects: true }]);
    }
  });
});
