/**
 * The emitters' fast, streamed paths against the readable one-shot forms: csvChunks against rows
 * made by csvRow (every cell through csvCell), jsonChunks against tableToJson, and the CLI
 * writing chunk by chunk without joining the table into one string first.
 */
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { runAllocate } from "../../src/cli/commands/allocate.js";
import { runEmit } from "../../src/cli/commands/emit.js";
import type { Io } from "../../src/cli/context.js";
import { loadPlanFile, lockPathFor, lockedAllocation } from "../../src/cli/plan-files.js";
import { CSV_HEADER, csvBanner, csvChunks, csvRow, tableToCsv } from "../../src/emit/csv.js";
import { jsonChunks, tableToJson } from "../../src/emit/json.js";
import { Prefix } from "../../src/net/prefix.js";
import { ALL_ONES } from "../../src/net/uint128.js";
import type { LocatorEntry, NodeTable, SidEntry, SidTable } from "../../src/sid/table.js";

/** Names a spreadsheet or a CSV reader could trip over, beside plain invented ones. */
const text = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom("tarn-p1", "fell-pe02", "wick", "bd-7", "blue", "port-1") },
  { weight: 1, arbitrary: fc.constantFrom("=cmd", "+1", "-x", "@home", "\tlead", "\rcr", 'say "hi"', "a,b", "two\nlines", "'quoted", "café", "") },
);
const prefixArb = fc.tuple(fc.bigInt({ min: 0n, max: ALL_ONES }), fc.integer({ min: 0, max: 128 })).map(([a, l]) => new Prefix(a, l));
const sidArb: fc.Arbitrary<SidEntry> = fc.record({
  sid: fc.bigInt({ min: 0n, max: ALL_ONES }),
  behavior: fc.oneof(fc.constantFrom("End", "End.X", "End.DT4", "End.DT2M"), text),
  flavors: fc.oneof(fc.constant([] as string[]), fc.constant(["PSP"]), fc.constant(["PSP", "USD"]), fc.array(text, { maxLength: 2 })),
  codepoint: fc.oneof(fc.constant(undefined), fc.integer({ min: 0, max: 65535 }), fc.integer({ min: -5, max: -1 })),
  algorithm: fc.oneof(fc.constantFrom(0, 128), fc.integer({ min: 0, max: 255 }), fc.integer({ min: -3, max: -1 })),
  locator: fc.option(prefixArb, { nil: undefined }),
  function: fc.oneof(fc.bigInt({ min: 0n, max: 0xffffn }), fc.bigInt({ min: 0n, max: ALL_ONES })),
  structure: fc.option(fc.record({ block: fc.integer({ min: 0, max: 128 }), node: fc.integer({ min: 0, max: 128 }), function: fc.integer({ min: 0, max: 128 }), argument: fc.integer({ min: 0, max: 128 }) }), { nil: undefined }),
  // integer-like keys ("9", "10") are ones JSON.stringify prints before the others
  context: fc.dictionary(fc.oneof(fc.constantFrom("neighbor", "interface", "vrf", "link"), text, fc.constantFrom("9", "10", "07", "a\u0000b")), text, { maxKeys: 4 }),
  key: fc.constant(""),
});
const locatorArb: fc.Arbitrary<LocatorEntry> = fc.record({ prefix: prefixArb, algorithm: fc.integer({ min: 0, max: 255 }), block: text, anycast: fc.oneof(fc.constant(""), text) });
/** Tables whose SIDs share locator, context and flavour objects, as an allocation's do. */
const tableArb: fc.Arbitrary<SidTable> = fc
  .tuple(fc.array(fc.tuple(text, fc.array(locatorArb, { maxLength: 3 }), fc.array(sidArb, { maxLength: 12 })), { maxLength: 8 }), text)
  .map(([nodes, plan]) => {
    const shared = nodes.flatMap(([, , sids]) => sids).slice(0, 3);
    const out: NodeTable[] = nodes.map(([node, locators, sids], i) => ({
      node: `${node}${i}`,
      locators,
      sids: sids.map((s, k) => (k % 3 === 2 && shared[0] ? { ...s, locator: shared[0].locator, context: shared[0].context, flavors: shared[0].flavors } : s)),
    }));
    return { plan, nodes: out };
  });

/** The readable CSV: banner, header, then csvRow for every SID, each line ending in CRLF. */
function csvReference(t: SidTable): string {
  let s = csvBanner(t.plan) + "\r\n" + CSV_HEADER.join(",") + "\r\n";
  for (const n of t.nodes) for (const sid of n.sids) s += csvRow(n.node, sid) + "\r\n";
  return s;
}

describe("streamed CSV", () => {
  it("has the bytes of csvRow, cell by cell through csvCell", () => {
    fc.assert(
      fc.property(tableArb, (t) => {
        expect([...csvChunks(t.plan, t.nodes)].join("")).toBe(csvReference(t));
        expect(tableToCsv(t)).toBe(csvReference(t));
      }),
      { seed: 4180, numRuns: 600 },
    );
  });

  it("comes in one piece per node, not as one string", () => {
    fc.assert(
      fc.property(tableArb, (t) => {
        const chunks = [...csvChunks(t.plan, t.nodes)];
        expect(chunks.length).toBe(2 + t.nodes.filter((n) => n.sids.length > 0).length);
      }),
      { seed: 4181, numRuns: 200 },
    );
  });
});

describe("streamed JSON", () => {
  it("has the bytes of tableToJson, for the whole table and for any nodes of it", () => {
    fc.assert(
      fc.property(tableArb, fc.nat(), (t, k) => {
        expect([...jsonChunks(t)].join("")).toBe(tableToJson(t));
        const some = t.nodes.filter((_, i) => (k >> i) & 1);
        expect([...jsonChunks(t, some)].join("")).toBe(tableToJson(t, some));
      }),
      { seed: 8259, numRuns: 400 },
    );
  });
});

describe("the emit command", () => {
  const dir = mkdtempSync(join(tmpdir(), "sidcarve-perf-"));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const plan = join(dir, "harbourline-metro.yaml");
  copyFileSync(new URL("../../sample-plans/harbourline-metro.yaml", import.meta.url), plan);
  const io = (out: string[]): Io => ({ out: (s) => void out.push(s), err: () => {}, isTty: false, now: new Date("2026-06-01T00:00:00Z") });

  it("writes the table to standard output chunk by chunk, with tableToCsv's bytes", () => {
    expect(runAllocate(plan, {}, io([]))).toBe(0);
    const a = lockedAllocation(loadPlanFile(plan), lockPathFor(plan));
    for (const format of ["csv", "json"] as const) {
      const out: string[] = [];
      expect(runEmit(plan, { format }, io(out))).toBe(0);
      expect(out.length).toBeGreaterThan(a.table.nodes.length);
      expect(out.join("")).toBe(format === "csv" ? tableToCsv(a.table) : tableToJson(a.table));
    }
  });

  it("writes the same bytes to a file", () => {
    const out: string[] = [];
    expect(runEmit(plan, { format: "csv", out: join(dir, "tables") }, io(out))).toBe(0);
    const a = lockedAllocation(loadPlanFile(plan), lockPathFor(plan));
    expect(readFileSync(join(dir, "tables", "harbourline-metro.sids.csv"), "utf8")).toBe(tableToCsv(a.table));
  });
});
