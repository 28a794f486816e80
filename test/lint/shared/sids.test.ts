/** The packed-table helpers of the SID rules against bigint and object references, on random inputs. */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Prefix } from "../../../src/net/prefix.js";
import { formatAddr } from "../../../src/net/text.js";
import { getField, prefixMask } from "../../../src/net/uint128.js";
import { runLint } from "../../../src/lint/engine.js";
import { inputFromTable } from "../../../src/lint/input.js";
import { PrefixMap, SidGroups, fieldAt, fieldIsZero, inSidOrder, leadMask, prefixClean, prefixHolds, sameLead, sidKinds } from "../../../src/lint/shared/sids.js";
import type { RuleContext } from "../../../src/lint/types.js";
import { type PackedSidTable, packTable, sidOrder } from "../../../src/sid/packed.js";
import type { SidEntry, SidTable } from "../../../src/sid/table.js";
import { TODAY } from "../harness.js";

const addr = fc.bigInt({ min: 0n, max: (1n << 128n) - 1n });
/** Addresses that share leading bits often. */
const nearAddr = fc.tuple(fc.constantFrom(0x5f000000n, 0x20010db8n, 0xffffffffn), fc.bigInt({ min: 0n, max: 7n }), addr).map(([a, b, c]) => (a << 96n) | (b << 90n) | (c & ((1n << 90n) - 1n)));

function entry(sid: bigint, extra: Partial<SidEntry> = {}): SidEntry {
  return { sid, behavior: "End", flavors: [], codepoint: undefined, algorithm: 0, locator: undefined, function: 0n, structure: undefined, context: {}, key: "0|End||", ...extra };
}

/** A packed table of the SIDs, one node per name given (names may repeat). */
function packed(nodes: { node: string; sids: SidEntry[]; locators?: Prefix[] }[]): PackedSidTable {
  const t: SidTable = { plan: "t", nodes: nodes.map((n) => ({ node: n.node, locators: (n.locators ?? []).map((prefix) => ({ prefix, algorithm: 0, block: "", anycast: "" })), sids: n.sids })) };
  return packTable(t);
}

/** The context of a lint run over the table (for helpers that take one). */
function contextOf(t: SidTable): RuleContext {
  let got: RuleContext | undefined;
  runLint(inputFromTable({ table: t, problems: [], unreadable: false }, "t.json", TODAY), [
    { meta: { id: "probe", severity: "info", summary: "", rationale: "", source: "", needs: "table" }, check: (ctx) => void (got = ctx) },
  ]);
  return got!;
}

describe("address bits on words", () => {
  it("leadMask keeps the leading bits of a word", () => {
    expect([leadMask(-3), leadMask(0), leadMask(1), leadMask(31), leadMask(32), leadMask(99)].map((m) => m >>> 0)).toEqual([0, 0, 0x80000000, 0xfffffffe, 0xffffffff, 0xffffffff]);
  });
  it("fieldAt and fieldIsZero read the field getField reads", () => {
    fc.assert(
      fc.property(addr, fc.integer({ min: 0, max: 128 }), fc.integer({ min: 0, max: 32 }), (a, offset, w) => {
        const width = Math.min(w, 128 - offset);
        const t = packed([{ node: "n", sids: [entry(a)] }]);
        expect(fieldAt(t, 0, offset, width)).toBe(Number(getField(a, offset, width)));
        expect(fieldIsZero(t, 0, offset, width)).toBe(getField(a, offset, width) === 0n);
      }),
    );
  });
  it("fieldIsZero on wide fields", () => {
    fc.assert(
      fc.property(addr, fc.integer({ min: 0, max: 128 }), fc.integer({ min: 0, max: 128 }), (a, offset, w) => {
        const width = Math.min(w, 128 - offset);
        const t = packed([{ node: "n", sids: [entry(a & ~(((1n << BigInt(width)) - 1n) << BigInt(128 - offset - width)))] }]);
        expect(fieldIsZero(t, 0, offset, width)).toBe(true);
        const u = packed([{ node: "n", sids: [entry(a)] }]);
        expect(fieldIsZero(u, 0, offset, width)).toBe(getField(a, offset, width) === 0n);
      }),
    );
  });
  it("prefixHolds, prefixClean and sameLead answer as Prefix and bigint masks do", () => {
    fc.assert(
      fc.property(nearAddr, nearAddr, fc.integer({ min: 0, max: 128 }), (p, s, len) => {
        const prefix = new Prefix(p, len);
        const t = packed([{ node: "n", sids: [entry(s), entry(p)], locators: [prefix] }]);
        const pid = t.locPrefix[0]!;
        expect(prefixHolds(t, pid, 0)).toBe(prefix.contains(s));
        expect(prefixClean(t, pid)).toBe(!prefix.hasHostBits);
        expect(sameLead(t, 0, 1, len)).toBe(((p ^ s) & prefixMask(len)) === 0n);
      }),
    );
  });
  it("PrefixMap finds a value by a SID's leading bits, as a map keyed by the masked address does", () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(nearAddr, fc.constantFrom(0, 16, 31, 32, 48, 64, 100, 128)), { minLength: 1, maxLength: 40 }), (items) => {
        const t = packed([{ node: "n", sids: items.map(([a]) => entry(a)) }]);
        const m = new PrefixMap<number>(t);
        const ref = new Map<string, number>();
        items.forEach(([a, len], i) => {
          const k = `${len}:${a & prefixMask(len)}`;
          expect(m.get(i, len)).toBe(ref.get(k));
          if (i % 3 !== 2) {
            m.set(i, len, i);
            ref.set(k, i);
          }
        });
        expect(m.values()).toEqual([...ref.values()]);
        // a prefix with host bits set is found by the SIDs it contains
        const [a, len] = items[0]!;
        const q = new PrefixMap<string>(t);
        q.setPrefix(new Prefix(a | 1n, len), "x");
        expect(q.get(0, len)).toBe(len === 128 && (a & 1n) === 0n ? undefined : "x");
      }),
    );
  });
});

describe("SID order and groups", () => {
  const sids = fc.array(fc.record({ node: fc.constantFrom("b", "a", "c"), sid: fc.constantFrom(1n, 2n, 3n, 1n << 100n, (1n << 127n) + 5n), row: fc.constantFrom(0, 0, 1, 2, 3, 4, 7) }), { minLength: 1, maxLength: 30 });
  const tableOf = (xs: { node: string; sid: bigint; row: number }[]) => {
    // one node entry per run of equal names, so names repeat across entries
    const nodes: { node: string; sids: SidEntry[] }[] = [];
    for (const x of xs) {
      const e = entry(x.sid, x.row > 0 ? { row: x.row } : {});
      const last = nodes[nodes.length - 1];
      if (last && last.node === x.node) last.sids.push(e);
      else nodes.push({ node: x.node, sids: [e] });
    }
    return nodes;
  };

  it("compareSids orders SIDs as sidOrder does (address, node name, source order)", () => {
    fc.assert(
      fc.property(sids, (xs) => {
        const t = packed(tableOf(xs));
        expect(inSidOrder(t, [...Array(t.count).keys()].reverse())).toEqual(Array.from(sidOrder(t)));
      }),
    );
  });

  it("a group's first SID is the one the object rules kept walking ctx.sids, whatever the order of adding", () => {
    fc.assert(
      fc.property(sids, fc.integer({ min: 0, max: 1000 }), (xs, seed) => {
        const t = packed(tableOf(xs));
        const order = Array.from(sidOrder(t));
        // reference: walk in SID order, keep the first, replace by a lower row when both have one
        const ref = new Map<number, { first: number; count: number; examples: number[] }>();
        for (const i of order) {
          const k = Number(t.w3[i]! % 2);
          const g = ref.get(k);
          if (!g) ref.set(k, { first: i, count: 1, examples: [i] });
          else {
            g.count++;
            if (g.examples.length < 3) g.examples.push(i);
            if (t.row[i]! > 0 && t.row[g.first]! > 0 && t.row[i]! < t.row[g.first]!) g.first = i;
          }
        }
        // add in a shuffled order
        const shuffled = [...order].sort((a, b) => ((a * 7919 + seed) % 101) - ((b * 7919 + seed) % 101));
        const groups = new SidGroups(t, 3);
        for (const i of shuffled) groups.add(Number(t.w3[i]! % 2), i, undefined);
        expect(groups.ordered().map((g) => ({ first: g.first, count: g.count, examples: g.examples }))).toEqual([...ref.values()]);
        const single = new SidGroups(t);
        for (const i of shuffled) single.add(Number(t.w3[i]! % 2), i, undefined);
        expect(single.ordered().map((g) => g.first)).toEqual([...ref.values()].map((g) => g.first));
      }),
    );
  });
});

describe("kinds of SIDs", () => {
  const kindCheck = (t: SidTable) => {
    const ctx = contextOf(t);
    const k = sidKinds(ctx);
    const p = ctx.packed.table;
    const seen = new Map<string, number>();
    for (let i = 0; i < p.count; i++) {
      const key = `${p.behavior[i]}|${p.flavorSet[i]}|${p.structure[i]}|${p.codepoint[i]}`;
      const kind = k.of[i]!;
      expect(seen.get(key) ?? kind).toBe(kind);
      seen.set(key, kind);
      expect([k.behavior[kind], k.flavorSet[kind], k.structure[kind], String(k.codepoint[kind])]).toEqual([p.behavior[i], p.flavorSet[i], p.structure[i], String(p.codepoint[i])]);
    }
    expect(k.count).toBe(seen.size);
  };
  it("SIDs of one kind agree on behaviour, flavours, structure and codepoint, and only those", () => {
    const sid = fc.record({
      behavior: fc.constantFrom("End", "End.X", "x"),
      flavors: fc.constantFrom([], ["PSP"], ["psp"]),
      codepoint: fc.constantFrom(undefined, 0, 1, 65535, 70000, -2, 1.5),
      structure: fc.constantFrom(undefined, { block: 48, node: 16, function: 16, argument: 0 }, { block: 64, node: 0, function: 16, argument: 0 }),
    });
    fc.assert(
      fc.property(fc.array(sid, { minLength: 1, maxLength: 30 }), (xs) => {
        kindCheck({ plan: "t", nodes: [{ node: "n", locators: [], sids: xs.map((x, i) => entry(BigInt(i), x)) }] });
      }),
    );
  });
  it("with more distinct values than a dense table holds, and more than a number key holds", () => {
    const xs = Array.from({ length: 2100 }, (_, i) => entry(BigInt(i), { behavior: `b${i}`, flavors: [`f${i % 2000}`], codepoint: i % 3 === 0 ? undefined : i }));
    kindCheck({ plan: "t", nodes: [{ node: "n", locators: [], sids: xs }] });
    const st = (i: number) => ({ block: i % 129, node: Math.floor(i / 129) % 129, function: 7, argument: 0 });
    const ys = Array.from({ length: 10001 }, (_, i) => entry(BigInt(i), { behavior: `b${i}`, flavors: [`f${i}`], codepoint: i, structure: st(i) }));
    kindCheck({ plan: "t", nodes: [{ node: "n", locators: [], sids: [...ys, ...ys.slice(0, 50).map((e) => ({ ...e, sid: e.sid + 20000n }))] }] });
  });
  it("formatWords of the packed words is formatAddr of the address", () => {
    fc.assert(
      fc.property(addr, (a) => {
        expect(packed([{ node: "n", sids: [entry(a)] }]).formatSid(0)).toBe(formatAddr(a));
      }),
    );
  });
});
