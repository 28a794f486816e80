/**
 * Building lint inputs: from a plan's allocation, or from a SID table read from an inventory
 * (optionally with the plan that holds the intent).
 */
import type { Allocation } from "../alloc/allocate.js";
import type { Plan } from "../plan/model.js";
import type { ReadTableResult } from "../sid/table-read.js";
import type { LintInput } from "./types.js";

/** The date as YYYY-MM-DD (UTC). */
export function isoDay(d: Date): string {
  return d.toISOString().slice(0, 10);
}

/** Lint a plan: its allocation is the table, the plan is the intent. */
export function inputFromAllocation(a: Allocation, today: string): LintInput {
  // the rules read the allocation's columns; its SID objects are only made if a rule asks for them
  return {
    get table() {
      return a.table;
    },
    packed: a.packed,
    file: a.plan.file,
    plan: a.plan,
    allocation: a,
    fromTable: false,
    rowProblems: [],
    today,
  };
}

/** Lint a SID table from a file; `plan` adds declared summaries, infrastructure, anycast groups and pools. */
export function inputFromTable(read: ReadTableResult, file: string, today: string, plan?: Plan): LintInput {
  return { table: read.table, file, plan, fromTable: true, rowProblems: read.problems, today, lineOf: read.lineOf };
}
