/**
 * Rule test harness in the ESLint manner: valid cases must give no finding of the rule, invalid
 * cases must give the expected findings (asserted by rule id, objects and location, never text).
 */
import { stringify } from "yaml";
import { allocate } from "../../src/alloc/allocate.js";
import { inputFromPacked, runLint } from "../../src/lint/engine.js";
import { inputFromAllocation, inputFromTable } from "../../src/lint/input.js";
import { ruleById } from "../../src/lint/rules/index.js";
import type { Finding } from "../../src/lint/types.js";
import { formatDiagnostic } from "../../src/plan/diagnostic.js";
import { loadPlanText } from "../../src/plan/load.js";
import type { Plan } from "../../src/plan/model.js";
import { readCsvPacked } from "../../src/sid/packed.js";
import { readCsvTable, readJsonTable } from "../../src/sid/table-read.js";

export const TODAY = "2026-06-01";

export function loadPlan(obj: unknown, file = "plan.yaml"): Plan {
  const r = loadPlanText(typeof obj === "string" ? obj : stringify(obj), file);
  if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.plan;
}

/** Findings of one rule on a plan (allocated from scratch). */
export function lintPlanWith(ruleId: string, obj: unknown): Finding[] {
  const rule = ruleById(ruleId);
  if (!rule) throw new Error(`no rule ${ruleId}`);
  const plan = loadPlan(obj);
  const r = allocate(plan, undefined);
  if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n") + r.moves.map((m) => m.what).join("\n"));
  return [...runLint(inputFromAllocation(r.allocation, TODAY), [rule]).findings];
}

/**
 * Findings of one rule on a CSV table, with an optional plan for intent. The table is read both
 * ways (readCsvTable, the readable reference, and readCsvPacked, the fast path the CLI uses);
 * the findings must be the same to the letter, or this throws.
 */
export function lintCsvWith(ruleId: string, csv: string, planObj?: unknown): Finding[] {
  const rule = ruleById(ruleId);
  if (!rule) throw new Error(`no rule ${ruleId}`);
  const plan = planObj === undefined ? undefined : loadPlan(planObj);
  const viaObjects = [...runLint(inputFromTable(readCsvTable(csv), "table.csv", TODAY, plan), [rule]).findings];
  const viaPacked = [...runLint(inputFromPacked(readCsvPacked(new TextEncoder().encode(csv)), "table.csv", TODAY, plan), [rule]).findings];
  const a = JSON.stringify(viaObjects, null, 1);
  const b = JSON.stringify(viaPacked, null, 1);
  if (a !== b) throw new Error(`rule ${ruleId}: the packed table gives other findings than the object table\nobjects: ${a}\npacked: ${b}`);
  return viaObjects;
}

/** Findings of one rule on a JSON table. */
export function lintJsonWith(ruleId: string, json: unknown, planObj?: unknown): Finding[] {
  const rule = ruleById(ruleId);
  if (!rule) throw new Error(`no rule ${ruleId}`);
  const plan = planObj === undefined ? undefined : loadPlan(planObj);
  return [...runLint(inputFromTable(readJsonTable(JSON.stringify(json)), "table.json", TODAY, plan), [rule]).findings];
}

/** A CSV table from rows of [node, sid, behavior, locator?, extra...] with the full header. */
export const CSV_HEAD = "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context";
export function csv(...rows: string[]): string {
  return [CSV_HEAD, ...rows].join("\n") + "\n";
}

/** A small valid classic plan (block /48, 16-bit node and function) to vary in tests. */
export function smallPlan(extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    sidcarve: 1,
    plan: "lint-test",
    levels: [
      { name: "site", bits: 8 },
      { name: "router", bits: 8, reserved: [0] },
    ],
    blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 16, function: 16, argument: 0 } }],
    groups: { quay: {}, mill: {} },
    nodes: [
      { name: "r1", place: "quay" },
      { name: "r2", place: "quay" },
      { name: "r3", place: "mill" },
    ],
    links: [{ ends: ["r1", "r2"] }, { ends: ["r2", "r3"] }],
    ...extra,
  };
}
