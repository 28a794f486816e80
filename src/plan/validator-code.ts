/**
 * The plan validator as source code: ajv compiles PLAN_SCHEMA (with the options the loader has
 * always used) to standalone JavaScript, which src/plan/plan-validator.generated.ts holds. Loading
 * that module costs a few milliseconds; compiling the schema at run time cost about 200 ms of
 * every command that reads a plan. `npm run schemas` rewrites the file; a test checks that it is
 * what this function gives for the current schema, so it cannot go stale.
 */
import { createRequire } from "node:module";
import type { Ajv2020 as Ajv2020Class, Options } from "ajv/dist/2020.js";
import { PLAN_SCHEMA } from "./schema.js";

const require = createRequire(import.meta.url);

/** The options of the plan validator. verbose: errors carry their schema, which the messages use to say what is allowed. */
export const PLAN_VALIDATOR_OPTIONS: Options = { allErrors: true, strict: false, verbose: true };

/** The text of src/plan/plan-validator.generated.ts. */
export function planValidatorCode(): string {
  const { Ajv2020 } = require("ajv/dist/2020.js") as { Ajv2020: typeof Ajv2020Class };
  const standaloneCode = (require("ajv/dist/standalone") as { default: (ajv: Ajv2020Class, v: unknown) => string }).default;
  const ajv = new Ajv2020({ ...PLAN_VALIDATOR_OPTIONS, code: { source: true, esm: true } });
  const code = lengthFirst(standaloneCode(ajv, ajv.compile(PLAN_SCHEMA)));
  // ajv's ESM output still calls require() for its runtime helpers (ucs2length)
  return [
    "// @ts-nocheck",
    "// GENERATED from src/plan/schema.ts by src/plan/validator-code.ts (`npm run schemas`); do not edit.",
    'import { createRequire } from "node:module";',
    "const require = createRequire(import.meta.url);",
    code.replace(/^"use strict";/, ""),
    "",
  ].join("\n");
}

/**
 * ajv checks maxLength and minLength by counting a string's code points (ucs2length), a loop over
 * every string of a plan. A string of n UTF-16 units has between n/2 and n code points, so its
 * length alone settles most checks: `count > max` needs counting only when n > max, and
 * `count < min` only when min <= n < 2 min. The same verdicts (a test compares them with the
 * validator ajv compiles at run time), about a tenth of a second less on a 20,000-router plan.
 */
function lengthFirst(code: string): string {
  const m = /const (func\d+) = require\("ajv\/dist\/runtime\/ucs2length"\)\.default;/.exec(code);
  if (!m) return code;
  const f = m[1]!;
  return code
    .replace(new RegExp(`${f}\\((data\\d*)\\) > (\\d+)`, "g"), (_, d: string, n: string) => `(${d}.length > ${n} && ${f}(${d}) > ${n})`)
    .replace(new RegExp(`${f}\\((data\\d*)\\) < (\\d+)`, "g"), (_, d: string, n: string) => `(${d}.length < ${n} || (${d}.length < ${2 * Number(n)} && ${f}(${d}) < ${n}))`);
}
