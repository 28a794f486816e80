/** Every bundled sample plan's own allocation lints clean at error level, with every rule on. */
import { readdirSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { allocate } from "../../src/alloc/allocate.js";
import { lintAllocation } from "../../src/lint/lint.js";
import { loadPlanText } from "../../src/plan/load.js";
import { TODAY } from "./harness.js";

const dir = new URL("../../sample-plans/", import.meta.url);
const samples = readdirSync(dir).filter((f) => /\.ya?ml$/.test(f));

describe("sample plans lint clean", () => {
  it("there are at least two sample plans", () => {
    expect(samples.length).toBeGreaterThanOrEqual(2);
  });
  for (const f of samples) {
    it(`${f}: no error-level finding from any rule`, () => {
      const r = loadPlanText(readFileSync(new URL(f, dir), "utf8"), f);
      expect(r.ok).toBe(true);
      if (!r.ok) return;
      const a = allocate(r.plan, undefined);
      expect(a.ok).toBe(true);
      if (!a.ok) return;
      const res = lintAllocation(a.allocation, TODAY);
      expect(res.rulesRun.length).toBeGreaterThan(30);
      expect(res.findings.filter((x) => x.severity === "error").map((x) => `${x.rule}: ${x.message}`)).toEqual([]);
    });
  }
});
