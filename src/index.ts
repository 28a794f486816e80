/**
 * sidcarve as a library: load a plan, allocate it against its lock, and print SID tables,
 * without touching files or the process. Re-exports only.
 */
export * from "./net/uint128.js";
export * from "./net/text.js";
export * from "./net/prefix.js";
export * from "./net/special.js";
export * from "./sid/behaviors.js";
export * from "./sid/table.js";
export * from "./plan/diagnostic.js";
export type * from "./plan/model.js";
export { loadPlanBytes, loadPlanText, type LoadResult } from "./plan/load.js";
export { parseSource, decodeUtf8, type Locator } from "./plan/source.js";
export { PLAN_SCHEMA } from "./plan/schema.js";
export { allocate, layoutFingerprint, poolsFor, type Allocation, type AllocateOptions, type AllocateResult, type Move, type UsageRow } from "./alloc/allocate.js";
export { parseLock, serializeLock, emptyLock, type Lock, type RetiredValue } from "./alloc/lock.js";
export { bitOrder, nthValue, rankOf } from "./alloc/order.js";
export { Decoder, type Decoded } from "./alloc/decode.js";
export { tableToCsv, csvChunks, CSV_HEADER } from "./emit/csv.js";
export { tableToJson, jsonChunks, SID_TABLE_SCHEMA_ID } from "./emit/json.js";
export { SID_TABLE_SCHEMA } from "./emit/table-schema.js";
export { CAUTION } from "./emit/caution.js";
export { safeFileName, neutralizeCell } from "./emit/names.js";
export { allocationSummary } from "./emit/summary.js";
export { diffTables, diffExitCode, bindingOf, type TableDiff, type NodeDiff, type SidChange } from "./diff/diff.js";
export { diffText, diffJson } from "./diff/render.js";
export { lintAllocation, lintTable } from "./lint/lint.js";
export { runLint, failExitCode, type LintResult, type LintOptions } from "./lint/engine.js";
export { ALL_RULES, RULES, ruleById, type RuleId } from "./lint/rules/index.js";
export type { Finding, Rule, RuleMeta, RuleContext, LintInput } from "./lint/types.js";
export { readCsvTable, readJsonTable, type ReadTableResult, REQUIRED_COLUMNS, OPTIONAL_COLUMNS } from "./sid/table-read.js";
export { lintText, lintJson, lintSarif, LINT_REPORT_SCHEMA } from "./emit/lint-report.js";
