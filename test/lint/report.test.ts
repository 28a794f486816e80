/**
 * Lint reports: SARIF 2.1.0 validated against the OASIS schema shipped in an npm package, the
 * JSON report against our schema, text without colour codes, and --fail-on exit codes.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import Ajv04 from "ajv-draft-04";
import { Ajv2020 } from "ajv/dist/2020.js";
import { describe, expect, it } from "vitest";
import { LINT_REPORT_SCHEMA, lintJson, lintSarif, lintText } from "../../src/emit/lint-report.js";
import { failExitCode, runLint } from "../../src/lint/engine.js";
import { inputFromTable } from "../../src/lint/input.js";
import { ALL_RULES } from "../../src/lint/rules/index.js";
import { readCsvTable } from "../../src/sid/table-read.js";
import { TODAY, csv } from "./harness.js";

const require = createRequire(import.meta.url);
const failing = csv(
  "a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
  "b,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,",
  "b,0,5f00:0:100:1::/64,not-an-address,End,,1,0x1,48,16,16,0,",
);
const result = runLint(inputFromTable(readCsvTable(failing), "inventory.csv", TODAY), ALL_RULES);

describe("SARIF output", () => {
  it("validates against the SARIF 2.1.0 JSON schema (OASIS, as shipped in @microsoft/jest-sarif)", () => {
    const schemaPath = require.resolve("@microsoft/jest-sarif/lib/schemas/sarif-2.1.0-rtm.5.json");
    const schema = JSON.parse(readFileSync(schemaPath, "utf8"));
    const ajv = new (Ajv04 as unknown as typeof import("ajv-draft-04").default)({ allErrors: true, strict: false, validateFormats: false, unicodeRegExp: false });
    const validate = ajv.compile(schema);
    const sarif = JSON.parse(lintSarif(result, ALL_RULES.map((r) => r.meta), "0.0.0-test"));
    const ok = validate(sarif);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });
  it("has the driver rules from the metadata and one result per finding with a ruleIndex", () => {
    const sarif = JSON.parse(lintSarif(result, ALL_RULES.map((r) => r.meta), "0.0.0-test"));
    const run = sarif.runs[0];
    expect(sarif.version).toBe("2.1.0"); // SARIF 2.1.0 §3.13.2
    expect(run.tool.driver.rules.map((r: { id: string }) => r.id)).toEqual(ALL_RULES.map((r) => r.meta.id));
    expect(run.results).toHaveLength(result.findings.length);
    for (const r of run.results) expect(run.tool.driver.rules[r.ruleIndex].id).toBe(r.ruleId);
    expect(result.findings.length).toBeGreaterThanOrEqual(2);
    expect(run.results.every((r: { level: string }) => ["error", "warning", "note"].includes(r.level))).toBe(true);
    // rows of a CSV table map to their physical line (header is line 1)
    const dup = run.results.find((r: { ruleId: string }) => r.ruleId === "sid-duplicate");
    expect(dup.locations[0].physicalLocation.region.startLine).toBe(3);
  });
});

describe("JSON and text output", () => {
  it("the JSON report validates against schemas/lint.schema.json", () => {
    const ajv = new Ajv2020({ allErrors: true, strict: false });
    const validate = ajv.compile(LINT_REPORT_SCHEMA);
    expect(validate(JSON.parse(lintJson(result, "inventory.csv")))).toBe(true);
  });
  it("text has no colour codes unless asked for", () => {
    expect(lintText(result, "inventory.csv", false)).not.toMatch(/\u001b\[/);
    expect(lintText(result, "inventory.csv", true)).toMatch(/\u001b\[31m/);
  });
  it("--fail-on sets the exit code by severity", () => {
    expect(failExitCode(result, "error")).toBe(1);
    const clean = runLint(inputFromTable(readCsvTable(csv("a,0,5f00:0:100:1::/64,5f00:0:100:1:1::,End,,1,0x1,48,16,16,0,")), "t.csv", TODAY), ALL_RULES);
    expect(clean.findings.filter((f) => f.severity === "error")).toEqual([]);
    expect(failExitCode(clean, "error")).toBe(0);
  });
});
