/**
 * The word helpers of src/lint/shared give what the bigint helpers of src/net give (the readable
 * reference) on random addresses and prefixes.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { behaviorOf, behaviorTest } from "../../../src/lint/shared/behavior.js";
import { PrefixIndex, compareRanges, coveringRange, endsBefore, isSubnetRange, rangePrefix, sidField, wordRange, wordRangeAt } from "../../../src/lint/shared/prefixes.js";
import { classifySid, decidingRows } from "../../../src/lint/shared/space.js";
import { Prefix, comparePrefixes, coveringPrefix } from "../../../src/net/prefix.js";
import { SPECIAL_RANGES, classify } from "../../../src/net/special.js";
import { getField, toWords } from "../../../src/net/uint128.js";
import { classifyCodepoint } from "../../../src/sid/behaviors.js";
import { PackedSidTable } from "../../../src/sid/packed.js";
import { decidingRows as referenceDecidingRows } from "./reference-rules.js";

const ALL = (1n << 128n) - 1n;
/** Addresses: anywhere, or inside a registry row, or next to a row's edge. */
const addrArb = fc.oneof(
  fc.bigInt(0n, ALL),
  fc.tuple(fc.constantFrom(...SPECIAL_RANGES), fc.bigInt(0n, ALL)).map(([r, x]) => r.prefix.first | (x & ((1n << BigInt(128 - r.prefix.len)) - 1n))),
  fc.tuple(fc.constantFrom(...SPECIAL_RANGES), fc.constantFrom(-1n, 0n, 1n)).map(([r, d]) => (r.prefix.last + d) & ALL),
);
const prefixArb = fc.tuple(addrArb, fc.nat(128)).map(([a, len]) => new Prefix(a, len));

/** A packed table holding these addresses as SIDs (and nothing else that the helpers read). */
function tableOf(addrs: readonly bigint[]): PackedSidTable {
  const t = new PackedSidTable("", addrs.length, addrs.length);
  addrs.forEach((a, i) => {
    const [w0, w1, w2, w3] = toWords(a);
    t.w0[i] = w0;
    t.w1[i] = w1;
    t.w2[i] = w2;
    t.w3[i] = w3;
  });
  return t;
}

const sameRange = (p: Prefix) => ({ ...wordRange(p.masked()) });

describe("word prefixes", () => {
  it("wordRangeAt reads a packed prefix as wordRange does, host bits cleared", () => {
    fc.assert(
      fc.property(prefixArb, (p) => {
        const t = tableOf([]);
        const id = t.addPrefix(p);
        const r = wordRangeAt(t, id);
        expect(r).toEqual(sameRange(p));
        const [l0, l1, l2, l3] = toWords(p.last);
        expect([r.l0, r.l1, r.l2, r.l3]).toEqual([l0, l1, l2, l3]);
        expect(rangePrefix(r).equals(p)).toBe(true);
      }),
    );
  });

  it("compareRanges, endsBefore and isSubnetRange agree with the Prefix methods", () => {
    fc.assert(
      fc.property(prefixArb, prefixArb, (a, b) => {
        const ra = wordRange(a);
        const rb = wordRange(b);
        expect(Math.sign(compareRanges(ra, rb))).toBe(Math.sign(comparePrefixes(a, b)));
        expect(endsBefore(ra, rb)).toBe(a.last < b.first);
        expect(isSubnetRange(ra, rb)).toBe(a.isSubnetOf(b));
      }),
    );
  });

  it("nested prefixes: isSubnetRange both ways", () => {
    fc.assert(
      fc.property(prefixArb, fc.nat(128), (p, extra) => {
        const inner = new Prefix(p.addr, Math.min(128, p.len + extra));
        expect(isSubnetRange(wordRange(inner), wordRange(p))).toBe(true);
        expect(isSubnetRange(wordRange(p), wordRange(inner))).toBe(inner.len === p.len);
      }),
    );
  });

  it("coveringRange is coveringPrefix", () => {
    fc.assert(
      fc.property(fc.array(prefixArb, { maxLength: 6 }), (ps) => {
        const want = coveringPrefix(ps);
        const got = coveringRange(ps.map(wordRange));
        if (!want) expect(got).toBeUndefined();
        else expect(got).toEqual(wordRange(want));
      }),
    );
  });

  it("sidField is getField on the SID's address", () => {
    fc.assert(
      fc.property(addrArb, fc.nat(128), fc.nat(40), (a, offset, width) => {
        fc.pre(offset + width <= 128);
        const t = tableOf([a]);
        expect(BigInt(sidField(t, 0, offset, width))).toBe(getField(a, offset, width));
      }),
    );
  });
});

describe("PrefixIndex on words", () => {
  /** The outermost prefix holding `a` (reference: every prefix, by bigints). */
  const outermost = (ps: readonly Prefix[], holds: (p: Prefix) => boolean) =>
    ps.filter(holds).sort((x, y) => x.len - y.len || comparePrefixes(x, y))[0];

  it("containingSid and containingRange find the outermost prefix that holds the question", () => {
    fc.assert(
      fc.property(fc.array(prefixArb, { maxLength: 8 }), fc.array(addrArb, { minLength: 1, maxLength: 8 }), prefixArb, (ps, addrs, q) => {
        const index = new PrefixIndex(ps.map((p, k) => ({ prefix: p, value: k })));
        const t = tableOf(addrs);
        // twice over, in the given order and backwards: the remembered last hit must not leak
        for (const i of [...addrs.keys(), ...[...addrs.keys()].reverse()]) {
          const want = outermost(ps, (p) => p.contains(addrs[i]!));
          expect(index.containingSid(t, i)?.prefix.masked().format()).toBe(want?.masked().format());
        }
        const want = outermost(ps, (p) => q.isSubnetOf(p));
        expect(index.containingRange(wordRange(q))?.prefix.masked().format()).toBe(want?.masked().format());
        expect(index.containing(q)?.prefix.masked().format()).toBe(want?.masked().format());
      }),
    );
  });
});

describe("decidingRows", () => {
  it("gives the reference's rows (its short cut included)", () => {
    fc.assert(
      fc.property(prefixArb, (p) => {
        expect(decidingRows(p)).toEqual(referenceDecidingRows(p));
      }),
      { numRuns: 500 },
    );
  });
});

describe("classifySid", () => {
  it("is classify of the SID as a /128", () => {
    fc.assert(
      fc.property(fc.array(addrArb, { minLength: 1, maxLength: 5 }), (addrs) => {
        const t = tableOf(addrs);
        addrs.forEach((a, i) => {
          const { row, index } = classifySid(t, i);
          expect(row).toBe(classify(new Prefix(a, 128)));
          expect(SPECIAL_RANGES[index]).toBe(row);
        });
      }),
    );
  });
});

describe("behaviorOf", () => {
  const NAMES = ["End", "End.X", "End.DT4", "End.DT6", "End.DT46", "Odd", "End.B6.Encaps"];
  /** The reference: is the SID a `name` SID, by name or by its codepoint (as the rules always said). */
  const isBehavior = (behavior: string, cp: number | undefined, name: string) => {
    if (behavior === name) return true;
    if (cp === undefined || !Number.isInteger(cp) || cp < 0 || cp > 0xffff) return false;
    const c = classifyCodepoint(cp);
    return c.kind === "behavior" && c.behavior === name;
  };

  it("gives the first listed name the SID performs, by name or codepoint", () => {
    const cpArb = fc.oneof(fc.constant(undefined), fc.integer({ min: -2, max: 70 }), fc.integer({ min: 0, max: 0x10001 }), fc.constant(1.5));
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom(...NAMES), cpArb), { minLength: 1, maxLength: 10 }), fc.shuffledSubarray(NAMES, { minLength: 1 }), (sids, names) => {
        const t = tableOf(sids.map(() => 0n));
        sids.forEach(([b, cp], i) => {
          let id = t.behaviors.indexOf(b);
          if (id < 0) id = t.behaviors.push(b) - 1;
          t.behavior[i] = id;
          t.codepoint[i] = cp ?? NaN;
        });
        const of = behaviorOf(t, names);
        const tests = names.map((n) => behaviorTest(t, n));
        sids.forEach(([b, cp], i) => {
          expect(of(i)).toBe(names.findIndex((n) => isBehavior(b, cp, n)));
          names.forEach((n, k) => expect(tests[k]!(i)).toBe(isBehavior(b, cp, n)));
        });
      }),
    );
  });
});
