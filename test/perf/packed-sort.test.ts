/**
 * The packed orders and the linter's lazy views against the readable reference: radixSortIndex
 * against a stable comparator sort, the engine's views against `prepare` (comparator sorts over
 * objects), and whole lint runs on the packed input against runs on readCsvTable's table.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { allocate } from "../../src/alloc/allocate.js";
import { LintViews, inputFromPacked, prepare, runLint } from "../../src/lint/engine.js";
import { inputFromAllocation, inputFromTable } from "../../src/lint/input.js";
import { ALL_RULES } from "../../src/lint/rules/index.js";
import type { LintInput, OwnedLocator, OwnedSid, Rule } from "../../src/lint/types.js";
import { formatAddr } from "../../src/net/text.js";
import { loadPlanText } from "../../src/plan/load.js";
import { locatorOrder, packTable, radixSortIndex, readCsvPacked, sidOrder } from "../../src/sid/packed.js";
import { readCsvTable } from "../../src/sid/table-read.js";
import { csvTableArb, plain } from "./arb.js";

const enc = new TextEncoder();
const TODAY = "2026-06-01";

const plainSid = (s: OwnedSid) => ({ node: s.node, ...plain({ plan: "", nodes: [{ node: s.node, locators: [], sids: [s.entry] }] }).nodes[0]!.sids[0]! });
const plainLoc = (l: OwnedLocator) => ({ node: l.node, prefix: l.entry.prefix.format(), algorithm: l.entry.algorithm, block: l.entry.block, anycast: l.entry.anycast });

describe("radixSortIndex", () => {
  it("sorts like a stable comparator sort", () => {
    const key = fc.oneof(fc.integer({ min: 0, max: 3 }), fc.integer({ min: 0, max: 0xffffffff }), fc.constantFrom(0, 0xffff, 0x10000, 0x7fffffff, 0x80000000, 0xffffffff));
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }).chain((k) => fc.array(fc.array(key, { minLength: k, maxLength: k }), { maxLength: 300 })), (rows) => {
        const n = rows.length;
        const k = rows[0]?.length ?? 1;
        const cols = Array.from({ length: k }, (_, c) => Uint32Array.from(rows, (r) => r[c]!));
        const ours = [...radixSortIndex(n, cols)];
        const ref = rows.map((_, i) => i).sort((a, b) => {
          for (let c = 0; c < k; c++) if (rows[a]![c] !== rows[b]![c]) return rows[a]![c]! - rows[b]![c]!;
          return a - b; // Array.prototype.sort is stable (ES2019): equal keys keep index order
        });
        expect(ours).toEqual(ref);
      }),
      { seed: 3531, numRuns: 800 },
    );
  });

  it("handles the empty and single cases", () => {
    expect([...radixSortIndex(0, [new Uint32Array(0)])]).toEqual([]);
    expect([...radixSortIndex(1, [Uint32Array.of(5)])]).toEqual([0]);
    expect([...radixSortIndex(3, [])]).toEqual([0, 1, 2]);
  });
});

describe("the packed orders give prepare's order", () => {
  it("for tables read from CSV", () => {
    let sids = 0;
    fc.assert(
      fc.property(csvTableArb, (text) => {
        const read = readCsvTable(text);
        if (read.unreadable) return;
        const ref = prepare(inputFromTable(read, "t.csv", TODAY));
        const packed = readCsvPacked(enc.encode(text));
        const views = new LintViews(inputFromPacked(packed, "t.csv", TODAY));
        expect(views.sids.map(plainSid)).toEqual(ref.sids.map(plainSid));
        expect(views.locators.map(plainLoc)).toEqual(ref.locators.map(plainLoc));
        // the packed orders themselves, index by index
        const t = packed.table;
        expect([...sidOrder(t)].map((i) => `${t.nodeOf(i)} ${t.formatSid(i)} ${t.row[i]}`)).toEqual(ref.sids.map((s) => `${s.node} ${formatAddr(s.entry.sid)} ${s.entry.row}`));
        expect([...locatorOrder(t)].map((id) => `${t.nodeNames[t.locNode[id]!]} ${t.prefixes[t.locPrefix[id]!]!.format()}`)).toEqual(ref.locators.map((l) => `${l.node} ${l.entry.prefix.format()}`));
        sids += ref.sids.length;
      }),
      { seed: 9352, numRuns: 800 },
    );
    expect(sids).toBeGreaterThan(1500);
  });

  it("for tables packed from objects, keeping the objects", () => {
    fc.assert(
      fc.property(csvTableArb, fc.boolean(), (text, shuffle) => {
        const read = readCsvTable(text);
        if (read.unreadable) return;
        // node tables out of name order and with a repeated name, as a hand-made table may have
        const nodes = shuffle ? [...read.table.nodes].reverse().concat(read.table.nodes.slice(0, 1)) : read.table.nodes;
        const table = { plan: "p", nodes };
        const input: LintInput = { table, file: "t", fromTable: true, rowProblems: [], today: TODAY };
        const ref = prepare(input);
        // the packed view of an object input: its orders give prepare's order, with the same objects
        const { table: p, sidOrder: so, locatorOrder: lo } = new LintViews(input).packed;
        expect(so.length).toBe(ref.sids.length);
        so.forEach((i, k) => {
          expect(p.entry(i)).toBe(ref.sids[k]!.entry);
          expect(p.nodeOf(i)).toBe(ref.sids[k]!.node);
          expect(p.formatSid(i)).toBe(formatAddr(ref.sids[k]!.entry.sid));
        });
        expect(lo.length).toBe(ref.locators.length);
        lo.forEach((id, k) => {
          expect(p.locatorEntry(id)).toBe(ref.locators[k]!.entry);
          expect(p.nodeNames[p.locNode[id]!]).toBe(ref.locators[k]!.node);
        });
        expect(p.toTable()).toBe(table);
        expect(packTable(table).toTable()).toBe(table);
      }),
      { seed: 8986, numRuns: 500 },
    );
  });

  it("for an allocation with anycast locators shared by two nodes", () => {
    const r = loadPlanText(
      [
        "sidcarve: 1",
        "plan: sort-test",
        "levels: [{ name: site, bits: 8 }, { name: router, bits: 8, reserved: [0] }]",
        "blocks: [{ name: b, prefix: '5f00:0:100::/48', structure: { node: 16, function: 16, argument: 0 } }]",
        "groups: { quay: {}, mill: {} }",
        "anycast: [{ name: edge, place: quay }]",
        "nodes: [{ name: r2, place: quay, anycast: [edge] }, { name: r1, place: quay, anycast: [edge] }, { name: r3, place: mill }]",
        "links: [{ ends: [r1, r2], protection: both }, { ends: [r2, r3] }]",
      ].join("\n"),
      "plan.yaml",
    );
    if (!r.ok) throw new Error(JSON.stringify(r.diagnostics));
    const a = allocate(r.plan, undefined);
    if (!a.ok) throw new Error("allocation failed");
    const input = inputFromAllocation(a.allocation, TODAY);
    const ref = prepare(input);
    const { table: p, sidOrder: so, locatorOrder: lo } = new LintViews(input).packed;
    expect([...so].map((i) => [p.nodeOf(i), p.entry(i)])).toEqual(ref.sids.map((s) => [s.node, s.entry]));
    expect([...lo].map((id) => [p.nodeNames[p.locNode[id]!], p.locatorEntry(id)])).toEqual(ref.locators.map((l) => [l.node, l.entry]));
    expect(ref.locators.filter((l) => l.entry.anycast === "edge").length).toBeGreaterThan(1);
  });
});

describe("lint runs on the packed input", () => {
  it("find what runs on readCsvTable's table find", () => {
    let findings = 0;
    fc.assert(
      fc.property(csvTableArb, (text) => {
        const read = readCsvTable(text);
        if (read.unreadable) return;
        const run = (input: LintInput) => {
          try {
            return { findings: runLint(input, ALL_RULES).findings };
          } catch (e) {
            return { error: String((e as Error).message).split("\n")[0] };
          }
        };
        const ref = run(inputFromTable(read, "t.csv", TODAY));
        const ours = run(inputFromPacked(readCsvPacked(enc.encode(text)), "t.csv", TODAY));
        expect(ours).toEqual(ref);
        findings += ref.findings?.length ?? 0;
      }),
      { seed: 2119, numRuns: 150 },
    );
    expect(findings).toBeGreaterThan(500);
  });

  it("make no view for a rule that does not ask for one", () => {
    let tableReads = 0;
    const read = readCsvPacked(enc.encode("node,sid,behavior\na,5f00::1,End\n"));
    const base = inputFromPacked(read, "t.csv", TODAY);
    const input: LintInput = {
      ...base,
      get table() {
        tableReads++;
        return base.table;
      },
      packed: undefined,
    };
    const quiet: Rule = { meta: { id: "quiet", severity: "info", summary: "", rationale: "", source: "common practice", needs: "table" }, check: () => {} };
    const timed: string[] = [];
    runLint(input, [quiet], { onRuleTimed: (id) => timed.push(id) });
    expect(tableReads).toBe(0);
    expect(timed).toEqual(["quiet"]);
    const asks: Rule = { ...quiet, meta: { ...quiet.meta, id: "asks" }, check: (ctx) => void ctx.sids.length };
    runLint(input, [asks], { onRuleTimed: (id) => timed.push(id) });
    expect(tableReads).toBeGreaterThan(0);
    expect(timed).toEqual(["quiet", "asks", "(views)"]);
  });
});
