/** Table rows that cannot be read (bad address, missing cells) are findings with their row and column. */
import type { Rule } from "../types.js";

export const tableRow: Rule = {
  meta: {
    id: "table-row",
    severity: "error",
    summary: "Give every table row a readable value in every column.",
    rationale: "A row that cannot be read is a SID the linter cannot check; an unparsable address in an inventory usually means a typo in the source of truth.",
    source: "RFC 4291 §2.2 (address text); RFC 4180 (CSV)",
    needs: "table",
  },
  check(ctx) {
    for (const p of ctx.input.rowProblems) {
      ctx.report({
        message: p.message,
        location: { file: ctx.input.file, row: p.row, line: ctx.input.lineOf?.(p.row), field: p.field || undefined },
        objects: p.value ? [p.value] : [],
        hint: p.row === 0 ? "fix the header line" : "correct or remove the row",
        data: { row: p.row, field: p.field },
      });
    }
  },
};
