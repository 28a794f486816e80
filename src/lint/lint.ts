/**
 * Linting entry points for the library: a plan (allocated against its lock) or a SID table.
 */
import type { Allocation } from "../alloc/allocate.js";
import type { Plan } from "../plan/model.js";
import type { ReadTableResult } from "../sid/table-read.js";
import { type LintOptions, type LintResult, runLint } from "./engine.js";
import { inputFromAllocation, inputFromTable } from "./input.js";
import { ALL_RULES } from "./rules/index.js";

/** Lint the allocation of a plan with every rule. */
export function lintAllocation(a: Allocation, today: string, options: LintOptions = {}): LintResult {
  return runLint(inputFromAllocation(a, today), ALL_RULES, options);
}

/** Lint a SID table read from a file, optionally with the plan that holds the intent. */
export function lintTable(read: ReadTableResult, file: string, today: string, plan?: Plan, options: LintOptions = {}): LintResult {
  return runLint(inputFromTable(read, file, today, plan), ALL_RULES, options);
}
