import { describe, expect, it } from "vitest";
import { allocate } from "../../../src/alloc/allocate.js";
import { runLint } from "../../../src/lint/engine.js";
import { inputFromAllocation } from "../../../src/lint/input.js";
import { ALL_RULES } from "../../../src/lint/rules/index.js";
import { TODAY, csv, lintCsvWith, lintPlanWith, loadPlan, smallPlan } from "../harness.js";

const RULE = "waiver-expired";
const waiver = (expires: string, objects = ["r1"]) => ({ lint: { waivers: [{ rule: "sid-duplicate", objects, reason: "migration window", expires }] } });

describe(RULE, () => {
  it("valid: a waiver that has not expired", () => {
    expect(lintPlanWith(RULE, smallPlan(waiver("2099-01-01")))).toEqual([]);
  });
  it("invalid: an expired waiver, located at its expiry date", () => {
    const f = lintPlanWith(RULE, smallPlan(waiver("2020-01-01")));
    expect(f.map((x) => [x.rule, x.objects, x.location.path])).toEqual([[RULE, ["r1"], ["lint", "waivers", 0, "expires"]]]);
    expect(f[0]!.location.line).toBeGreaterThan(1);
  });
  it("a valid waiver hides the findings of its rule for the named objects; an expired one does not", () => {
    const t = csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,", "b,0,5f00:0:100:2::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,");
    expect(lintCsvWith("sid-duplicate", t, smallPlan(waiver("2099-01-01", ["a"])))).toEqual([]);
    expect(lintCsvWith("sid-duplicate", t, smallPlan(waiver("2099-01-01", ["c"])))).toHaveLength(1);
    expect(lintCsvWith("sid-duplicate", t, smallPlan(waiver("2020-01-01", ["a"])))).toHaveLength(1);
  });
  it("severity set to off in the plan keeps the rule from running", () => {
    const plan = loadPlan(smallPlan({ lint: { severity: { "locator-overlap": "off" } } }));
    const r = allocate(plan, undefined);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const res = runLint(inputFromAllocation(r.allocation, TODAY), ALL_RULES);
    expect(res.rulesRun).not.toContain("locator-overlap");
    expect(res.rulesRun).toContain("sid-duplicate");
  });
});
