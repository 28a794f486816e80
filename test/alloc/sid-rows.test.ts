/**
 * The allocator's SID sink: placing a function value into the four address words without a bigint
 * (setSidWords) against the bigint expression it stands for, and writing nodes into columns.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type RowSource, type SidRow, SidRowSink, setSidWords, sortRows } from "../../src/alloc/sid-rows.js";
import { Prefix } from "../../src/net/prefix.js";
import { ALL_ONES, toWords } from "../../src/net/uint128.js";

const words = (w: { w0: number; w1: number; w2: number; w3: number }) => [w.w0, w.w1, w.w2, w.w3];

describe("setSidWords", () => {
  it("gives toWords(first | fn << shift) for every shift and for values below and above 2^32", () => {
    // a field of `bits` bits at `shift` from the bottom, the address zero there (as a locator's first address is)
    const case_ = fc
      .tuple(fc.integer({ min: 0, max: 127 }), fc.integer({ min: 1, max: 64 }), fc.bigInt({ min: 0n, max: ALL_ONES }), fc.bigInt({ min: 0n, max: (1n << 64n) - 1n }))
      .map(([shift, width, addr, raw]) => {
        const bits = Math.min(width, 128 - shift);
        const field = ((1n << BigInt(bits)) - 1n) << BigInt(shift);
        return { shift, first: addr & ~field & ALL_ONES, fn: raw & ((1n << BigInt(bits)) - 1n) };
      });
    fc.assert(
      fc.property(case_, ({ shift, first, fn }) => {
        const r = { w0: -1, w1: -1, w2: -1, w3: -1 };
        setSidWords(r, toWords(first), first, shift, fn);
        expect(words(r)).toEqual(toWords(first | (fn << BigInt(shift))));
      }),
      { seed: 8986, numRuns: 3000 },
    );
  });

  it("handles the edges of each word: the lowest and highest bit, values that straddle two words", () => {
    const first = 0x5f00_0000_0000_0000_0000_0000_0000_0000n;
    for (const [shift, fn] of [
      [0, 1n],
      [0, 0xffffffffn],
      [16, 0xffffffffn], // straddles words 3 and 2
      [31, 1n],
      [32, 0xabcdn],
      [48, 0xffffn], // straddles words 2 and 1
      [80, 0xffffn], // straddles words 1 and 0
      [96, 0xffn],
      [100, 0xfffn],
      [64, 0x1_0000_0000n], // 2^32 and above take the bigint path
      [0, (1n << 64n) - 1n],
    ] as const) {
      const r = { w0: 0, w1: 0, w2: 0, w3: 0 };
      setSidWords(r, toWords(first), first, shift, fn);
      expect(words(r), `shift ${shift} fn ${fn.toString(16)}`).toEqual(toWords(first | (fn << BigInt(shift))));
    }
  });
});

describe("SidRowSink", () => {
  it("sorts each node's rows by address, algorithm and behaviour, and gives entries with the sources' contexts and keys", () => {
    const sources: RowSource[] = [
      { context: { vrf: "blue" }, rowId: 0 },
      { context: { neighbor: "fell-p2" }, rowId: 1 },
    ];
    const sink = new SidRowSink("demo", sources, (src, algo) => `${algo}|${src.rowId}`);
    const loc = { prefix: new Prefix(0x5f00_0000_0001n << 80n, 48), algorithm: 0, block: "b", anycast: "" };
    const shapeA = { behavior: "End.X", flavors: ["PSP"], codepoint: 53, structure: { block: 32, node: 16, function: 16, argument: 0 } };
    const shapeB = { behavior: "End.DT4", flavors: [], codepoint: 19, structure: { block: 32, node: 16, function: 16, argument: 0 } };
    const rows = [
      [3n, 0, shapeB, 0],
      [2n, 0, shapeA, 1],
      [2n, 0, shapeB, 0], // same address and algorithm: End.DT4 sorts before End.X
    ] as const;
    const out = rows.map(([fn, algo, shape, src]) => {
      const r = sink.row();
      setSidWords(r, toWords(loc.prefix.first), loc.prefix.first, 64, fn);
      r.algorithm = algo;
      r.shape = shape;
      r.fn = fn;
      r.source = sources[src]!;
      r.locator = loc;
      return r;
    });
    sink.writeNode("fell-pe1", [loc], out);
    const t = sink.finish();
    expect(t.count).toBe(3);
    const got = [0, 1, 2].map((i) => t.entry(i));
    expect(got.map((e) => [e.function, e.behavior, e.key])).toEqual([
      [2n, "End.DT4", "0|0"],
      [2n, "End.X", "0|1"],
      [3n, "End.DT4", "0|0"],
    ]);
    expect(got[1]!.context).toBe(sources[1]!.context);
    expect(got[1]!.flavors).toBe(shapeA.flavors);
    expect(got[0]!.locator).toBe(loc.prefix);
    expect(got[2]!.sid).toBe(loc.prefix.first | (3n << 64n));
    expect(t.toTable().nodes.map((n) => [n.node, n.locators, n.sids.length])).toEqual([["fell-pe1", [loc], 3]]);
  });
});

describe("SidRowSink locators", () => {
  it("gives equal prefixes one prefix id (the same object or not) and prefixes of another length their own", () => {
    const sink = new SidRowSink("demo", [], () => "");
    const at = (hi: bigint, len: number) => new Prefix(hi << 80n, len);
    const entry = (prefix: Prefix, algorithm = 0) => ({ prefix, algorithm, block: "b", anycast: "" });
    const shared = entry(at(0x5f00_0000_0001n, 48)); // an anycast group's locator, listed by two nodes
    const locs = [
      [shared, entry(at(0x5f00_0000_0001n, 48), 128), entry(at(0x5f00_0000_0001n, 64)), entry(at(0x5f00_0000_0002n, 48))],
      [shared, entry(at(0x5f00_0000_0001n, 64)), entry(at(0x5f00_0000_0001n, 56))],
    ];
    sink.writeNode("fell-p1", locs[0]!, []);
    sink.writeNode("fell-p2", locs[1]!, []);
    const t = sink.finish();
    const ids = Array.from({ length: t.locatorCount }, (_, l) => t.locPrefix[l]!);
    const text = (id: number) => t.prefixes[id]!.format();
    // by value: 5f00:0:1::/48 (three times), /64 (twice), /56, 5f00:0:2::/48
    expect(ids.map(text)).toEqual(["5f00:0:1::/48", "5f00:0:1::/48", "5f00:0:1::/64", "5f00:0:2::/48", "5f00:0:1::/48", "5f00:0:1::/64", "5f00:0:1::/56"]);
    expect(new Set(ids).size).toBe(4);
    expect(ids[0]).toBe(ids[1]);
    expect(ids[0]).toBe(ids[4]);
    expect(ids[2]).toBe(ids[5]);
  });
});

describe("sortRows", () => {
  // the reference: Array.prototype.sort with the row order written out (address words, algorithm, behaviour name)
  const refOrder = (a: SidRow, b: SidRow) => a.w0 - b.w0 || a.w1 - b.w1 || a.w2 - b.w2 || a.w3 - b.w3 || a.algorithm - b.algorithm || (a.shape.behavior < b.shape.behavior ? -1 : a.shape.behavior > b.shape.behavior ? 1 : 0);
  const shape = (behavior: string) => ({ behavior, flavors: [], codepoint: undefined, structure: { block: 32, node: 16, function: 16, argument: 0 } });
  const shapes = ["End", "End.X", "End.DT4"].map(shape);
  // few distinct values, so that ties (equal rows) are common and stability shows; `id` tells equal rows apart
  const row = fc.record({ w2: fc.integer({ min: 0, max: 3 }), w3: fc.integer({ min: 0, max: 5 }), algorithm: fc.constantFrom(0, 128), shape: fc.constantFrom(...shapes) });

  it("gives the order (and, among equal rows, the input order) that Array.prototype.sort gives, below and above the insertion-sort size", () => {
    fc.assert(
      fc.property(fc.array(row, { maxLength: 300 }), fc.boolean(), (specs, nearlySorted) => {
        let rows: SidRow[] = specs.map((s, id) => ({ w0: 0x5f000000, w1: 0, w2: s.w2, w3: s.w3, algorithm: s.algorithm, shape: s.shape, fn: BigInt(id), source: { context: {} }, locator: undefined as never }));
        // a node's rows mostly come nearly in order: sorted, with a few moved
        if (nearlySorted) rows = [...rows].sort(refOrder).map((r, i, all) => (i % 7 === 3 ? all[all.length - 1 - i]! : r)).filter((r, i, all) => all.indexOf(r) === i);
        const want = [...rows].sort(refOrder).map((r) => r.fn);
        const got = [...rows];
        sortRows(got);
        expect(got.map((r) => r.fn)).toEqual(want);
      }),
      { seed: 5952, numRuns: 400 },
    );
  });
});
