/**
 * Lint results as text (grouped by severity, with a summary table), as JSON
 * (schemas/lint.schema.json) and as SARIF 2.1.0 (OASIS) for CI systems.
 */
import Table from "cli-table3";
import type { LintResult } from "../lint/engine.js";
import type { Finding, FindingSeverity, RuleMeta } from "../lint/types.js";
import { formatLocation } from "../plan/diagnostic.js";
import type { SourceLocation } from "../plan/diagnostic.js";
import { CAUTION } from "./caution.js";

export const LINT_SCHEMA_ID = "sidcarve/lint/v1";

const ORDER: FindingSeverity[] = ["error", "warning", "info"];
const COLOUR: Record<FindingSeverity, string> = { error: "\u001b[31m", warning: "\u001b[33m", info: "\u001b[36m" };
const RESET = "\u001b[0m";

/** Text report; colour only when `color` is true (the CLI passes TTY and not NO_COLOR). */
export function lintText(result: LintResult, input: string, color: boolean): string {
  const paint = (sev: FindingSeverity, s: string) => (color ? `${COLOUR[sev]}${s}${RESET}` : s);
  const out: string[] = [];
  for (const sev of ORDER) {
    const fs = result.findings.filter((f) => f.severity === sev);
    if (fs.length === 0) continue;
    out.push(paint(sev, `${sev} (${fs.length})`));
    for (const f of fs) {
      out.push(`  ${formatLocation(f.location)}: ${f.message} [${f.rule}]`);
      if (f.hint) out.push(`    hint: ${f.hint}`);
    }
    out.push("");
  }
  const byRule = new Map<string, { sev: FindingSeverity; n: number }>();
  for (const f of result.findings) {
    const e = byRule.get(f.rule) ?? { sev: f.severity, n: 0 };
    e.n++;
    byRule.set(f.rule, e);
  }
  if (byRule.size > 0) {
    const t = new Table({ head: ["rule", "severity", "findings"], style: { head: [], border: [] } });
    for (const [rule, e] of [...byRule.entries()].sort(([a], [b]) => (a < b ? -1 : 1))) t.push([rule, e.sev, String(e.n)]);
    out.push(t.toString());
  }
  const c = result.counts;
  out.push(
    `${input}: ${c.error} error${c.error === 1 ? "" : "s"}, ${c.warning} warning${c.warning === 1 ? "" : "s"}, ${c.info} info` +
      (result.waived.length ? `, ${result.waived.length} waived` : "") +
      ` (${result.rulesRun.length} rules run)`,
  );
  return out.join("\n") + "\n";
}

function locationJson(l: SourceLocation): Record<string, unknown> {
  const o: Record<string, unknown> = { file: l.file };
  if (l.line !== undefined) o.line = l.line;
  if (l.column !== undefined) o.column = l.column;
  if (l.path !== undefined) o.path = [...l.path];
  if (l.row !== undefined) o.row = l.row;
  if (l.field !== undefined) o.field = l.field;
  return o;
}

function findingJson(f: Finding): Record<string, unknown> {
  return { rule: f.rule, severity: f.severity, message: f.message, location: locationJson(f.location), objects: [...f.objects], hint: f.hint, data: { ...f.data } };
}

/** JSON report (`sidcarve/lint/v1`). */
export function lintJson(result: LintResult, input: string): string {
  return (
    JSON.stringify(
      {
        schema: LINT_SCHEMA_ID,
        input,
        caution: CAUTION,
        counts: result.counts,
        rules: [...result.rulesRun],
        findings: result.findings.map(findingJson),
        waived: result.waived.map(findingJson),
      },
      null,
      2,
    ) + "\n"
  );
}

const SARIF_LEVEL: Record<FindingSeverity, "error" | "warning" | "note"> = { error: "error", warning: "warning", info: "note" };

/**
 * SARIF 2.1.0: tool.driver.rules from the rule metadata, one result per finding with its
 * physical location (file, line, column when known) and the plan path as a logical location.
 */
export function lintSarif(result: LintResult, rules: readonly RuleMeta[], version: string): string {
  const index = new Map(rules.map((r, i) => [r.id, i]));
  const uri = (file: string) => file.replace(/\\/g, "/");
  const sarif = {
    $schema: "https://json.schemastore.org/sarif-2.1.0.json",
    version: "2.1.0",
    runs: [
      {
        tool: {
          driver: {
            name: "sidcarve",
            version,
            rules: rules.map((r) => ({
              id: r.id,
              name: r.id.replace(/(^|-)([a-z])/g, (_, __, c: string) => c.toUpperCase()),
              shortDescription: { text: r.summary },
              fullDescription: { text: r.rationale },
              help: { text: `${r.rationale} Source: ${r.source}.` },
              defaultConfiguration: { level: SARIF_LEVEL[r.severity] },
              properties: { source: r.source, needs: r.needs },
            })),
          },
        },
        results: result.findings.map((f) => {
          const loc: Record<string, unknown> = {
            physicalLocation: {
              artifactLocation: { uri: uri(f.location.file) },
              ...(f.location.line !== undefined ? { region: { startLine: f.location.line, ...(f.location.column !== undefined ? { startColumn: f.location.column } : {}) } } : {}),
            },
          };
          if (f.location.path && f.location.path.length > 0) loc.logicalLocations = [{ fullyQualifiedName: f.location.path.join("."), kind: "member" }];
          const res: Record<string, unknown> = {
            ruleId: f.rule,
            level: SARIF_LEVEL[f.severity],
            message: { text: f.hint ? `${f.message}. Hint: ${f.hint}` : f.message },
            locations: [loc],
            properties: { objects: [...f.objects], data: { ...f.data }, ...(f.location.row !== undefined ? { row: f.location.row } : {}) },
          };
          const i = index.get(f.rule);
          if (i !== undefined) res.ruleIndex = i;
          return res;
        }),
      },
    ],
  };
  return JSON.stringify(sarif, null, 2) + "\n";
}

/** The JSON Schema of the lint JSON report. */
export const LINT_REPORT_SCHEMA = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://sidcarve.invalid/schemas/lint.schema.json",
  title: "sidcarve lint report",
  type: "object",
  required: ["schema", "input", "counts", "findings"],
  additionalProperties: false,
  $defs: {
    finding: {
      type: "object",
      required: ["rule", "severity", "message", "location", "objects", "hint", "data"],
      additionalProperties: false,
      properties: {
        rule: { type: "string" },
        severity: { enum: ["error", "warning", "info"] },
        message: { type: "string" },
        location: {
          type: "object",
          required: ["file"],
          additionalProperties: false,
          properties: {
            file: { type: "string" },
            line: { type: "integer", minimum: 1 },
            column: { type: "integer", minimum: 1 },
            path: { type: "array", items: { type: ["string", "integer"] } },
            row: { type: "integer", minimum: 0 },
            field: { type: "string" },
          },
        },
        objects: { type: "array", items: { type: "string" } },
        hint: { type: "string" },
        data: { type: "object", additionalProperties: { type: ["string", "number"] } },
      },
    },
  },
  properties: {
    schema: { const: LINT_SCHEMA_ID },
    input: { type: "string" },
    caution: { type: "string" },
    counts: {
      type: "object",
      required: ["error", "warning", "info"],
      additionalProperties: false,
      properties: { error: { type: "integer" }, warning: { type: "integer" }, info: { type: "integer" } },
    },
    rules: { type: "array", items: { type: "string" } },
    findings: { type: "array", items: { $ref: "#/$defs/finding" } },
    waived: { type: "array", items: { $ref: "#/$defs/finding" } },
  },
} as const;
