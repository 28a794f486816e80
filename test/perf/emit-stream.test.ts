/**
 * The emitters' fast, streamed paths against the readable one-shot forms: csvChunks against rows
 * made by csvRow (every cell through csvCell), csvByteChunks against the UTF-8 bytes of
 * tableToCsv, jsonChunks against tableToJson, and the CLI writing chunk by chunk without joining
 * the table into one string first.
 */
import { copyFileSync, mkdtempSync, readFileSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { runAllocate } from "../../src/cli/commands/allocate.js";
import { runEmit } from "../../src/cli/commands/emit.js";
import type { Io } from "../../src/cli/context.js";
import { loadPlanFile, lockPathFor, lockedAllocation } from "../../src/cli/plan-files.js";
import { CSV_HEADER, csvBanner, csvByteChunks, csvChunks, csvPackedChunks, csvRow, tableToCsv, textChunks } from "../../src/emit/csv.js";
import { packTable } from "../../src/sid/packed.js";
import { jsonChunks, tableToJson } from "../../src/emit/json.js";
import { safeFileName } from "../../src/emit/names.js";
import { Prefix } from "../../src/net/prefix.js";
import { ALL_ONES } from "../../src/net/uint128.js";
import type { LocatorEntry, NodeTable, SidEntry, SidTable } from "../../src/sid/table.js";

/** Names a spreadsheet or a CSV reader could trip over, beside plain invented ones. */
const text = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom("tarn-p1", "fell-pe02", "wick", "bd-7", "blue", "port-1") },
  { weight: 1, arbitrary: fc.constantFrom("=cmd", "+1", "-x", "@home", "\tlead", "\rcr", 'say "hi"', "a,b", "two\nlines", "'quoted", "café", "") },
  // beyond ASCII: accents, a character outside the BMP, a lone surrogate (UTF-8 writes U+FFFD)
  { weight: 1, arbitrary: fc.constantFrom("Ærø-1", "nœud,β", "\u{1F6F0}-sat", "bad\ud800half", "=Ω", "\u00a0nbsp") },
);
/** Numbers that are not small whole numbers: fractions, 2^32 and above, NaN, -0. */
const odd = fc.constantFrom(1.5, -0.25, 2 ** 32, 2 ** 32 - 1, 2 ** 53 + 2, 1e21, Number.NaN, -0);
const structNum = fc.oneof({ weight: 8, arbitrary: fc.integer({ min: 0, max: 128 }) }, { weight: 1, arbitrary: fc.integer({ min: -4, max: -1 }) }, { weight: 1, arbitrary: odd });
const prefixArb = fc.tuple(fc.bigInt({ min: 0n, max: ALL_ONES }), fc.integer({ min: 0, max: 128 })).map(([a, l]) => new Prefix(a, l));
const sidArb: fc.Arbitrary<SidEntry> = fc.record({
  sid: fc.bigInt({ min: 0n, max: ALL_ONES }),
  behavior: fc.oneof(fc.constantFrom("End", "End.X", "End.DT4", "End.DT2M"), text),
  flavors: fc.oneof(fc.constant([] as string[]), fc.constant(["PSP"]), fc.constant(["PSP", "USD"]), fc.array(text, { maxLength: 2 })),
  codepoint: fc.oneof(fc.constant(undefined), fc.integer({ min: 0, max: 65535 }), fc.integer({ min: -5, max: -1 }), odd),
  algorithm: fc.oneof(fc.constantFrom(0, 128), fc.integer({ min: 0, max: 255 }), fc.integer({ min: -3, max: -1 }), odd),
  locator: fc.option(prefixArb, { nil: undefined }),
  // around 2^32 and 2^53, up to 2^128, and negative (printed "0x-..", as toString(16) has it)
  function: fc.oneof(fc.bigInt({ min: 0n, max: 0xffffn }), fc.bigInt({ min: 0n, max: ALL_ONES }), fc.bigInt({ min: 0xfffffff0n, max: 0x100000010n }), fc.bigInt({ min: (1n << 53n) - 2n, max: (1n << 64n) }), fc.bigInt({ min: -(1n << 70n), max: -1n })),
  structure: fc.option(fc.record({ block: structNum, node: structNum, function: structNum, argument: structNum }), { nil: undefined }),
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

/** All of csvByteChunks's chunks, collected first and joined afterwards (they must stay as yielded). */
function byteChunks(t: SidTable, chunkBytes?: number): Uint8Array[] {
  return [...csvByteChunks(t.plan, t.nodes, chunkBytes)];
}

/** Every chunk but the last has exactly chunkBytes bytes; the last has 1..chunkBytes. */
function expectCut(chunks: readonly Uint8Array[], chunkBytes: number): void {
  expect(chunks.length).toBeGreaterThan(0);
  chunks.forEach((c, i) => {
    if (i < chunks.length - 1) {
      expect(c.length).toBe(chunkBytes);
    } else {
      expect(c.length).toBeGreaterThan(0);
      expect(c.length).toBeLessThanOrEqual(chunkBytes);
    }
  });
}

/** Bytes as a string of one character per byte, so that a mismatch shows as a readable diff. */
const bytesText = (b: Uint8Array) => Buffer.from(b.buffer, b.byteOffset, b.length).toString("latin1");

describe("CSV as bytes", () => {
  it("has exactly the UTF-8 bytes of tableToCsv, in chunks of the size asked for", () => {
    fc.assert(
      fc.property(tableArb, fc.oneof(fc.constantFrom(1, 7, 64, 4096), fc.integer({ min: 1, max: 600 })), (t, size) => {
        const want = Buffer.from(tableToCsv(t), "utf8");
        const chunks = byteChunks(t, size);
        expectCut(chunks, size);
        expect(bytesText(Buffer.concat(chunks))).toBe(bytesText(want));
        // the default chunk (1 MiB) holds these small tables whole
        const whole = byteChunks(t);
        expect(whole.length).toBe(1);
        expect(bytesText(whole[0]!)).toBe(bytesText(want));
      }),
      { seed: 3629, numRuns: 600 },
    );
  });

  it("has the same bytes when written from a packed table's columns (csvPackedChunks) as from its SID objects", () => {
    fc.assert(
      fc.property(tableArb, fc.oneof(fc.constantFrom(1, 7, 4096), fc.integer({ min: 1, max: 600 })), (t, size) => {
        // only values the columns can hold: algorithms that are 32-bit whole numbers, codepoints
        // other than NaN (NaN is "none" there); the reference is the object writer over the
        // packed table's objects, nodes in the same order
        const whole = { ...t, nodes: t.nodes.map((n) => ({ ...n, sids: n.sids.map((e) => ({ ...e, algorithm: Number.isInteger(e.algorithm) && Math.abs(e.algorithm) < 2 ** 31 ? e.algorithm : 7, codepoint: Number.isNaN(e.codepoint) ? undefined : e.codepoint })) })) };
        const p = packTable(whole);
        const ids = p.nodeIdsByName();
        const want = Buffer.concat([...csvByteChunks(p.plan, ids.map((id) => p.freshNode(id)), size)]);
        const chunks = [...csvPackedChunks(p, ids, size)];
        expectCut(chunks, size);
        expect(bytesText(Buffer.concat(chunks))).toBe(bytesText(want));
      }),
      { seed: 8754, numRuns: 600 },
    );
  });

  it("grows for rows longer than a chunk and cuts large tables at the default size", () => {
    const long = "x".repeat(6000);
    const wide = "é,".repeat(3000);
    fc.assert(
      fc.property(tableArb, fc.constantFrom(7, 64, 4096), (t, size) => {
        const nodes: NodeTable[] = t.nodes.map((n, i) => ({
          ...n,
          node: i % 2 ? `${n.node}${long}` : n.node,
          sids: n.sids.map((sid, k) => (k % 4 === 1 ? { ...sid, context: { ...sid.context, [long]: wide, note: long } } : k % 4 === 3 ? { ...sid, behavior: wide } : sid)),
        }));
        const big: SidTable = { plan: t.plan, nodes };
        const chunks = byteChunks(big, size);
        expectCut(chunks, size);
        expect(bytesText(Buffer.concat(chunks))).toBe(bytesText(Buffer.from(tableToCsv(big), "utf8")));
      }),
      { seed: 3630, numRuns: 30 },
    );
    // about 2 MB: full 1 MiB chunks and a short last one
    const sample = fc.sample(sidArb, { seed: 3631, numRuns: 200 });
    const nodes: NodeTable[] = Array.from({ length: 100 }, (_, i) => ({ node: `wick-${i}`, locators: [], sids: Array.from({ length: 150 }, (_, k) => sample[(i * 7 + k) % sample.length]!) }));
    const big: SidTable = { plan: "fell", nodes };
    const want = Buffer.from(tableToCsv(big), "utf8");
    expect(want.length).toBeGreaterThan(2 << 20);
    const chunks = byteChunks(big);
    expectCut(chunks, 1 << 20);
    expect(bytesText(Buffer.concat(chunks))).toBe(bytesText(want));
  });

  it("writes contexts of many key lists, in any key order, as formatContext does", () => {
    // more key lists than the emitter keeps sorted at once, the same keys in different orders,
    // keys that are hostile or not ASCII, and values that are not strings
    const keys = ["vrf", "link", "b", "a", "=k", "k,2", "ключ", "", "z", "10", "9"];
    const sids = fc.sample(sidArb, { seed: 3632, numRuns: 400 }).map((s, i) => {
      const context: Record<string, string> = {};
      for (let j = 0; j < 1 + (i % 4); j++) context[keys[(i * 7 + j * (1 + (i % 5))) % keys.length]!] = j % 3 === 2 ? (i as unknown as string) : `v${i}-${j}`;
      return { ...s, context };
    });
    const t: SidTable = { plan: "wick", nodes: [{ node: "tarn-p1", locators: [], sids }] };
    for (const size of [64, 1 << 20]) expect(bytesText(Buffer.concat(byteChunks(t, size)))).toBe(bytesText(Buffer.from(tableToCsv(t), "utf8")));
  });

  it("refuses a chunk size that is not a whole number of at least 1", () => {
    for (const bad of [0, -1, 1.5, Number.NaN]) expect(() => byteChunks({ plan: "p", nodes: [] }, bad)).toThrow(RangeError);
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

describe("textChunks", () => {
  it("gives the text of UTF-8 bytes cut anywhere, characters split across chunks included", () => {
    fc.assert(
      fc.property(fc.string({ unit: "grapheme", maxLength: 200 }), fc.array(fc.nat(), { maxLength: 12 }), (text, cuts) => {
        const bytes = Buffer.from(text, "utf8");
        const at = [...new Set(cuts.map((c) => c % (bytes.length + 1)))].sort((x, y) => x - y);
        const chunks: Uint8Array[] = [];
        let from = 0;
        for (const c of [...at, bytes.length]) {
          chunks.push(bytes.subarray(from, c));
          from = c;
        }
        const got = [...textChunks(chunks)];
        expect(got.join("")).toBe(text);
        expect(got.every((s) => s.length > 0)).toBe(true);
      }),
      { seed: 3629, numRuns: 500 },
    );
    // "é" (c3 a9) and "✓" (e2 9c 93) cut inside
    expect([...textChunks([Uint8Array.of(0x61, 0xc3), Uint8Array.of(0xa9, 0xe2, 0x9c), Uint8Array.of(0x93)])]).toEqual(["a", "é", "✓"]);
  });
});

describe("the emit command", () => {
  const dir = mkdtempSync(join(tmpdir(), "sidcarve-perf-"));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const plan = join(dir, "harbourline-metro.yaml");
  copyFileSync(new URL("../../sample-plans/harbourline-metro.yaml", import.meta.url), plan);
  const io = (out: string[]): Io => ({ out: (s) => void out.push(s), err: () => {}, isTty: false, now: new Date("2026-06-01T00:00:00Z") });

  it("writes the table to standard output chunk by chunk, with tableToCsv's and tableToJson's text", async () => {
    expect(await runAllocate(plan, {}, io([]))).toBe(0);
    const a = lockedAllocation(loadPlanFile(plan), lockPathFor(plan));
    for (const format of ["csv", "json"] as const) {
      const out: string[] = [];
      expect(await runEmit(plan, { format }, io(out))).toBe(0);
      // JSON a node at a time; CSV in 64 KiB chunks (this table is smaller)
      if (format === "json") expect(out.length).toBeGreaterThan(a.table.nodes.length);
      expect(out.join("")).toBe(format === "csv" ? tableToCsv(a.table) : tableToJson(a.table));
    }
  });

  it("waits for standard output to drain before writing the next chunk", async () => {
    // a reader that takes each chunk later: emit must not write again until it has
    for (const format of ["csv", "json"] as const) {
      const out: string[] = [];
      let waiting = 0;
      let early = 0;
      const slow: Io = {
        ...io(out),
        out: (s) => {
          if (waiting > 0) early++;
          out.push(s);
        },
        drained: () => {
          waiting++;
          return new Promise((resolve) =>
            setTimeout(() => {
              waiting--;
              resolve();
            }, 1),
          );
        },
      };
      expect(await runEmit(plan, { format }, slow)).toBe(0);
      expect(early).toBe(0);
      expect(out.length).toBeGreaterThan(0);
      const a = lockedAllocation(loadPlanFile(plan), lockPathFor(plan));
      expect(out.join("")).toBe(format === "csv" ? tableToCsv(a.table) : tableToJson(a.table));
    }
  });

  it("writes a larger table to standard output in several CSV chunks, with tableToCsv's text", async () => {
    const planFile = join(dir, "tessaline-stdout.yaml");
    copyFileSync(new URL("../../sample-plans/tessaline-backbone.yaml", import.meta.url), planFile);
    expect(await runAllocate(planFile, {}, io([]))).toBe(0);
    const out: string[] = [];
    expect(await runEmit(planFile, { format: "csv" }, io(out))).toBe(0);
    expect(out.length).toBeGreaterThan(1);
    expect(out.join("")).toBe(tableToCsv(lockedAllocation(loadPlanFile(planFile), lockPathFor(planFile)).table));
  });

  it("writes the same bytes to a file", async () => {
    const out: string[] = [];
    expect(await runEmit(plan, { format: "csv", out: join(dir, "tables") }, io(out))).toBe(0);
    const a = lockedAllocation(loadPlanFile(plan), lockPathFor(plan));
    expect(readFileSync(join(dir, "tables", "harbourline-metro.sids.csv"), "utf8")).toBe(tableToCsv(a.table));
  });

  // The files (CSV written from csvByteChunks) hold the UTF-8 bytes of the strings, byte for byte,
  // for every sample plan, as one file and one file per node.
  for (const sample of ["harbourline-metro", "tessaline-backbone"]) {
    it(`writes ${sample} as one file and per node with the bytes of tableToCsv`, async () => {
      const own = join(dir, sample);
      const planFile = join(dir, `${sample}.yaml`);
      const lock = join(own, "plan.lock.json");
      copyFileSync(new URL(`../../sample-plans/${sample}.yaml`, import.meta.url), planFile);
      expect(await runAllocate(planFile, { lock }, io([]))).toBe(0);
      const p = loadPlanFile(planFile);
      const t = lockedAllocation(p, lock).table;
      expect(t.nodes.length).toBeGreaterThan(1);
      expect(await runEmit(planFile, { format: "csv", lock, out: join(own, "one") }, io([]))).toBe(0);
      expect(readFileSync(join(own, "one", `${safeFileName(p.name)}.sids.csv`)).equals(Buffer.from(tableToCsv(t), "utf8"))).toBe(true);
      expect(await runEmit(planFile, { format: "csv", lock, out: join(own, "nodes"), perNode: true }, io([]))).toBe(0);
      expect(readdirSync(join(own, "nodes")).length).toBe(t.nodes.length);
      for (const n of t.nodes) {
        const bytes = readFileSync(join(own, "nodes", `${safeFileName(n.node)}.csv`));
        expect(bytes.equals(Buffer.from(tableToCsv({ plan: t.plan, nodes: [n] }), "utf8"))).toBe(true);
      }
      // JSON files are still written from strings
      expect(await runEmit(planFile, { format: "json", lock, out: join(own, "json") }, io([]))).toBe(0);
      expect(readFileSync(join(own, "json", `${safeFileName(p.name)}.sids.json`), "utf8")).toBe(tableToJson(t));
    });
  }
});
