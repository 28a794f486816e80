/** Every JSON Schema we publish, by file name under schemas/. */
import { LINT_REPORT_SCHEMA } from "./emit/lint-report.js";
import { DIFF_SCHEMA } from "./diff/schema.js";
import { SID_TABLE_SCHEMA } from "./emit/table-schema.js";
import { PLAN_SCHEMA } from "./plan/schema.js";

export const schemaFiles: Readonly<Record<string, unknown>> = {
  "plan.schema.json": PLAN_SCHEMA,
  "sid-table.schema.json": SID_TABLE_SCHEMA,
  "lint.schema.json": LINT_REPORT_SCHEMA,
  "diff.schema.json": DIFF_SCHEMA,
};
