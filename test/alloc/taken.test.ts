/**
 * TakenValues, the allocator's set of function values taken on a locator, against the plain
 * Set<bigint> it stands for, on random runs of resets, adds and questions (values in the marked
 * range, beyond it, negative, and fields wider than the marks).
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { MARK_BITS, TakenValues } from "../../src/alloc/taken.js";

type Step = { kind: "reset"; bits: number; initial: bigint[] } | { kind: "add"; v: bigint } | { kind: "has"; v: bigint };

describe("TakenValues", () => {
  it("answers has() as a Set<bigint> does, across resets of any field width", () => {
    const value = fc.oneof(fc.bigInt({ min: 0n, max: 40n }), fc.bigInt({ min: -3n, max: 1n << 24n }), fc.bigInt({ min: 0n, max: 1n << 70n }));
    const step: fc.Arbitrary<Step> = fc.oneof(
      { weight: 1, arbitrary: fc.record({ kind: fc.constant("reset" as const), bits: fc.constantFrom(4, 8, 16, MARK_BITS, MARK_BITS + 1, 32), initial: fc.array(value, { maxLength: 6 }) }) },
      { weight: 6, arbitrary: fc.record({ kind: fc.constant("add" as const), v: value }) },
      { weight: 6, arbitrary: fc.record({ kind: fc.constant("has" as const), v: value }) },
    );
    fc.assert(
      fc.property(fc.array(fc.bigInt({ min: 0n, max: 20n }), { maxLength: 4 }), fc.array(step, { maxLength: 80 }), (first, steps) => {
        const t = new TakenValues();
        t.reset(16, first);
        let ref = new Set(first);
        for (const s of steps) {
          if (s.kind === "reset") {
            t.reset(s.bits, s.initial);
            ref = new Set(s.initial);
          } else if (s.kind === "add") {
            t.add(s.v);
            ref.add(s.v);
          } else expect(t.has(s.v)).toBe(ref.has(s.v));
        }
        // and every value the reference holds, at the end
        for (const v of ref) expect(t.has(v)).toBe(true);
      }),
      { seed: 8986, numRuns: 500 },
    );
  });

  it("forgets every value at a reset, including those of a wider field before", () => {
    const t = new TakenValues();
    t.reset(16, [1n, 0xffffn]);
    t.add(0x10000n); // beyond a 16-bit field: kept apart
    expect([t.has(1n), t.has(0xffffn), t.has(0x10000n), t.has(2n)]).toEqual([true, true, true, false]);
    t.reset(8, [3n]);
    expect([t.has(1n), t.has(0xffffn), t.has(0x10000n), t.has(3n)]).toEqual([false, false, false, true]);
  });
});
