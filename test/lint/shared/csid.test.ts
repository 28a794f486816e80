/** Reading compressed SIDs from the packed table, against the object helpers the rules used before (test/lint/reference). */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { allocate } from "../../../src/alloc/allocate.js";
import { runLint } from "../../../src/lint/engine.js";
import { inputFromAllocation, inputFromTable } from "../../../src/lint/input.js";
import { blockScope, csidFlavorOf, csidShape, shapeOf } from "../../../src/lint/shared/csid.js";
import type { LintInput, RuleContext } from "../../../src/lint/types.js";
import type { SidEntry } from "../../../src/sid/table.js";
import { TODAY, loadPlan, smallPlan } from "../harness.js";
import * as ref from "../reference/csid-length.js";

/** The context of a lint run over the input. */
function contextOf(input: LintInput): RuleContext {
  let got: RuleContext | undefined;
  runLint(input, [{ meta: { id: "probe", severity: "info", summary: "", rationale: "", source: "", needs: "table" }, check: (ctx) => void (got = ctx) }]);
  return got!;
}

describe("csidFlavorOf and csidShape", () => {
  it("read the C-SID flavour in any spelling; both flavours read as NEXT-CSID", () => {
    expect([[], ["PSP"], ["next-c-sid"], ["replace-csid", "PSP"], ["REPLACE-CSID", "NEXT-CSID"]].map(csidFlavorOf)).toEqual([undefined, undefined, "NEXT-CSID", "REPLACE-CSID", "NEXT-CSID"]);
  });
  it("RFC 9800 §8 global+local C-SIDs of 16 or 32 bits; §6.4 16-bit REPLACE-CSID only on a marked locator", () => {
    const st = (node: number, fn: number) => ({ block: 48, node, function: fn, argument: 0 });
    expect(csidShape("NEXT-CSID", st(16, 16), false)).toEqual({ kind: "two", length: 16 });
    expect(csidShape("NEXT-CSID", st(8, 8), false)).toEqual({ kind: "one", length: 16 });
    expect(csidShape("REPLACE-CSID", st(16, 16), false)).toEqual({ kind: "one", length: 32 });
    expect(csidShape("REPLACE-CSID", st(16, 16), true)).toEqual({ kind: "two", length: 16 });
  });
});

describe("shapeOf and blockScope give what the object helpers gave", () => {
  const STRUCTURES = [undefined, [48, 16, 0, 64], [48, 16, 16, 48], [48, 0, 16, 64], [48, 32, 0, 48], [48, 8, 8, 0], [64, 64, 16, 0], [120, 8, 0, 0], [48, 16, 16, 64]];
  const sid = fc.record({
    high: fc.constantFrom(0x5f000000_0000_0100n, 0x5f000000_0000_0101n),
    low: fc.constantFrom(0n, 1n << 48n, 2n << 48n, 0xc000n << 48n, 1n << 32n),
    flavors: fc.constantFrom([], ["NEXT-CSID"], ["REPLACE-CSID"], ["replace-csid", "PSP"], ["NEXT-CSID", "REPLACE-CSID"], ["next-c-sid"]),
    structure: fc.constantFrom(...STRUCTURES),
  });
  const table = fc.array(fc.tuple(fc.constantFrom("a", "b"), sid), { minLength: 1, maxLength: 30 }).map((xs) => ({
    plan: "t",
    nodes: ["a", "b"].map((node) => ({
      node,
      locators: [],
      sids: xs
        .filter(([n]) => n === node)
        .map(([, s]): SidEntry => {
          const st = s.structure;
          const structure = st ? { block: st[0]!, node: st[1]!, function: st[2]!, argument: st[3]! } : undefined;
          return { sid: (s.high << 64n) | s.low, behavior: "End", flavors: s.flavors, codepoint: undefined, algorithm: 0, locator: undefined, function: 0n, structure, context: {}, key: "" };
        }),
    })),
  }));

  it("on random tables: the same reading for every SID, the 16-bit REPLACE-CSID locators included", () => {
    fc.assert(
      fc.property(table, (t) => {
        const ctx = contextOf(inputFromTable({ table: t, problems: [], unreadable: false }, "t.json", TODAY));
        const r16 = ref.replace16Locators(ctx.sids);
        const shapes = shapeOf(ctx);
        const order = ctx.packed.sidOrder;
        let any = false;
        ctx.sids.forEach((s, k) => {
          const want = ref.shapeOf(s, r16);
          if (want) any = true;
          expect(shapes.at(order[k]!)).toEqual(want);
        });
        expect(shapes.any).toBe(any);
      }),
    );
  });

  it("on allocated plans: the block of each SID, or its node", () => {
    const plans = [
      smallPlan(),
      smallPlan({
        blocks: [
          { name: "c", prefix: "5f00:0:100::/48", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0xbfff"], "local-pool": ["0xc000-0xffff"] } },
          { name: "d", prefix: "5f00:0:200::/48", structure: { node: 16, function: 16, argument: 0 } },
        ],
      }),
    ];
    for (const obj of plans) {
      const a = allocate(loadPlan(obj), undefined);
      if (!a.ok) throw new Error("allocation failed");
      const ctx = contextOf(inputFromAllocation(a.allocation, TODAY));
      const want = ref.blockScope(ctx);
      const got = blockScope(ctx);
      const order = ctx.packed.sidOrder;
      ctx.sids.forEach((s, k) => {
        const w = want(s);
        const scope = got.of(order[k]!);
        expect(scope).toBeLessThan(got.count);
        expect(got.block(scope)).toEqual(w.block);
      });
      // node scopes of two SIDs are equal exactly when their keys are
      const keys = ctx.sids.map((s, k) => [want(s).key, got.of(order[k]!)] as const);
      for (const [ka, sa] of keys) for (const [kb, sb] of keys.slice(0, 20)) expect(ka === kb).toBe(sa === sb);
    }
  });
});
