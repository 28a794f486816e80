/** `sidcarve lint INPUT [--plan PLAN]`: lint a plan's allocation or a SID table from an inventory. */
import { isUtf8 } from "node:buffer";
import { extname } from "node:path";
import { lintJson, lintSarif, lintText } from "../../emit/lint-report.js";
import { type LintResult, failExitCode, inputFromPacked, runLint as runRules } from "../../lint/engine.js";
import { isoDay } from "../../lint/input.js";
import { lintAllocation, lintTable } from "../../lint/lint.js";
import { ALL_RULES } from "../../lint/rules/index.js";
import type { FindingSeverity } from "../../lint/types.js";
import { decodeUtf8 } from "../../plan/source.js";
import { readCsvPacked } from "../../sid/packed.js";
import { readJsonTable } from "../../sid/table-read.js";
import type { Io } from "../context.js";
import { UsageError, readInput, writeAtomic } from "../io.js";
import { allocateOrFail, loadPlanAndLock, loadPlanFile, lockPathFor } from "../plan-files.js";
import { VERSION } from "../version.js";

export interface LintFlags {
  readonly plan?: string;
  readonly lock?: string;
  readonly format?: string;
  readonly failOn?: string;
  readonly report?: string;
  readonly force?: boolean;
}

/** What kind of file INPUT is: a CSV table, a JSON table, or a plan. */
export function inputKind(file: string, bytes: Uint8Array): "csv" | "json-table" | "plan" {
  const ext = extname(file).toLowerCase();
  if (ext === ".csv") return "csv";
  if (ext === ".json") {
    const head = Buffer.from(bytes.subarray(0, 4096)).toString("utf8");
    if (/"schema"\s*:\s*"sidcarve\/sid-table\//.test(head)) return "json-table";
  }
  return "plan";
}

export async function runLint(input: string, flags: LintFlags, io: Io): Promise<number> {
  const failOn = (flags.failOn ?? "error") as FindingSeverity;
  const today = isoDay(io.now);
  // `let`, so that a large CSV file's bytes can be let go once the table is in columns
  let bytes: Uint8Array | undefined = readInput(input);
  const kind = inputKind(input, bytes);
  let result: LintResult;
  if (kind === "plan") {
    if (flags.plan) throw new UsageError(`${input} is a plan; --plan is only for SID tables`);
    bytes = undefined;
    const { plan, lock } = await loadPlanAndLock(input, lockPathFor(input, flags.lock));
    result = lintAllocation(allocateOrFail(plan, lock, {}), today);
  } else if (kind === "csv") {
    // CSV tables are read straight from the bytes into columns (same result as readCsvTable on
    // the decoded text); decodeUtf8 is only needed for the message when the bytes are not UTF-8.
    if (!isUtf8(bytes)) {
      const d = decodeUtf8(bytes, input);
      throw new UsageError(`${input}: cannot be read`, d.ok ? [] : d.diagnostics);
    }
    const read = readCsvPacked(bytes);
    bytes = undefined;
    if (read.unreadable) {
      throw new UsageError(`${input}: not a SID table: ${read.problems.map((p) => p.message).join("; ")}`);
    }
    const plan = flags.plan ? loadPlanFile(flags.plan) : undefined;
    result = runRules(inputFromPacked(read, input, today, plan), ALL_RULES);
  } else {
    const d = decodeUtf8(bytes, input);
    if (!d.ok) throw new UsageError(`${input}: cannot be read`, d.diagnostics);
    const read = readJsonTable(d.text);
    if (read.unreadable) {
      throw new UsageError(`${input}: not a SID table: ${read.problems.map((p) => p.message).join("; ")}`);
    }
    const plan = flags.plan ? loadPlanFile(flags.plan) : undefined;
    result = lintTable(read, input, today, plan);
  }
  const text =
    flags.format === "json" ? lintJson(result, input) : flags.format === "sarif" ? lintSarif(result, ALL_RULES.map((r) => r.meta), VERSION) : lintText(result, input, io.isTty);
  if (flags.report) {
    // a text report written to a file opens with a banner line so a later run knows it as ours
    const body = flags.format === "json" || flags.format === "sarif" ? text : `# sidcarve lint report for ${input}\n${text}`;
    writeAtomic(flags.report, [body], { force: flags.force });
    io.out(`${input}: ${result.counts.error} errors, ${result.counts.warning} warnings, ${result.counts.info} info; report written to ${flags.report}\n`);
  } else io.out(text);
  return failExitCode(result, failOn);
}
