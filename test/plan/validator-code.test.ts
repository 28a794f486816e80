/**
 * The plan validator compiled ahead of time (src/plan/plan-validator.generated.ts) is the code
 * ajv gives for the current plan schema, and it judges plans as the validator ajv compiles at run
 * time does: the same verdict and the same errors, on the sample plans and on broken copies.
 */
import { readFileSync, readdirSync } from "node:fs";
import { createRequire } from "node:module";
import type { ValidateFunction } from "ajv";
import type { Ajv2020 as Ajv2020Class } from "ajv/dist/2020.js";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { validate as generated } from "../../src/plan/plan-validator.generated.js";
import { PLAN_SCHEMA } from "../../src/plan/schema.js";
import { parseSource } from "../../src/plan/source.js";
import { PLAN_VALIDATOR_OPTIONS, planValidatorCode } from "../../src/plan/validator-code.js";

const require = createRequire(import.meta.url);
const { Ajv2020 } = require("ajv/dist/2020.js") as { Ajv2020: typeof Ajv2020Class };
const atRunTime = new Ajv2020(PLAN_VALIDATOR_OPTIONS).compile(PLAN_SCHEMA);
const ahead = generated as unknown as ValidateFunction;

const samples = readdirSync(new URL("../../sample-plans/", import.meta.url)).filter((f) => /\.ya?ml$/.test(f));
const dataOf = (file: string): unknown => {
  const r = parseSource(readFileSync(new URL(`../../sample-plans/${file}`, import.meta.url), "utf8"), file);
  if (!r.ok) throw new Error(`${file} does not parse`);
  return r.data;
};

/** What a validator says of `data`: its verdict and its errors without the schema objects (compared by path). */
function verdict(v: ValidateFunction, data: unknown) {
  const ok = v(data);
  return { ok, errors: (v.errors ?? []).map((e) => ({ instancePath: e.instancePath, schemaPath: e.schemaPath, keyword: e.keyword, params: e.params, message: e.message, data: e.data })) };
}

/** Every path to a value inside `v` (objects and arrays). */
function paths(v: unknown, at: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  out.push(at);
  if (Array.isArray(v)) v.forEach((x, i) => paths(x, [...at, i], out));
  else if (v !== null && typeof v === "object") for (const [k, x] of Object.entries(v)) paths(x, [...at, k], out);
  return out;
}

const clone = <T>(v: T): T => structuredClone(v);

describe("the plan validator compiled ahead of time", () => {
  it("is the code ajv gives for the current plan schema (run `npm run schemas` after changing it)", () => {
    const file = readFileSync(new URL("../../src/plan/plan-validator.generated.ts", import.meta.url), "utf8");
    expect(file === planValidatorCode()).toBe(true);
  });

  it("accepts every sample plan, as the run-time validator does", () => {
    expect(samples.length).toBeGreaterThan(1);
    for (const f of samples) {
      const d = dataOf(f);
      expect(verdict(ahead, d)).toEqual(verdict(atRunTime, d));
      expect(ahead(d)).toBe(true);
    }
  });

  it("gives the run-time validator's errors on broken copies of the sample plans", () => {
    const plans = samples.map(dataOf);
    // strings about the length limits, some with characters outside the BMP (two UTF-16 units, one
    // code point: the generated code settles length checks by .length first, see validator-code.ts)
    const near = [1, 2, 3, 63, 64, 65, 127, 128, 129].flatMap((n) => ["x".repeat(n), "\u{1F600}".repeat(n), "x" + "\u{1F600}".repeat(Math.max(0, n - 1))]);
    const junk = [null, -1, 1.5, "", "x".repeat(300), "zz::/999", true, [], {}, { bogus: 1 }, 2 ** 60, "\u{1F600}", ...near];
    let rejected = 0;
    fc.assert(
      fc.property(fc.nat(), fc.nat(), fc.nat(junk.length - 1), fc.constantFrom("replace", "delete", "add-key"), (pi, ki, ji, how) => {
        const data = clone(plans[pi % plans.length]) as Record<string, unknown>;
        const all = paths(data).filter((p) => p.length > 0);
        const path = all[ki % all.length]!;
        let parent: unknown = data;
        for (const k of path.slice(0, -1)) parent = (parent as Record<string | number, unknown>)[k];
        const last = path[path.length - 1]!;
        const p = parent as Record<string | number, unknown>;
        if (how === "replace") p[last] = clone(junk[ji]);
        else if (how === "delete") {
          if (Array.isArray(p)) p.splice(last as number, 1);
          else delete p[last];
        } else if (p[last] !== null && typeof p[last] === "object" && !Array.isArray(p[last])) (p[last] as Record<string, unknown>)["not-a-key"] = 1;
        const want = verdict(atRunTime, data);
        if (!want.ok) rejected++;
        expect(verdict(ahead, data)).toEqual(want);
      }),
      { seed: 9800, numRuns: 600 },
    );
    // most of the copies are broken, so the errors were compared, not only the verdicts
    expect(rejected).toBeGreaterThan(250);
  });
  it("judges strings about every length limit as the run-time validator does, at every string of a sample plan", () => {
    // the generated code settles maxLength/minLength by .length first (validator-code.ts): strings
    // of 1..129 units, some of characters outside the BMP (two units, one code point)
    const near = [1, 2, 3, 63, 64, 65, 127, 128, 129].flatMap((n) => ["x".repeat(n), "\u{1F600}".repeat(Math.ceil(n / 2)), "x" + "\u{1F600}".repeat(n >> 1)]);
    const plan = dataOf("harbourline-metro.yaml");
    const stringPaths = paths(plan).filter((p) => {
      let v: unknown = plan;
      for (const k of p) v = (v as Record<string | number, unknown>)[k];
      return typeof v === "string";
    });
    expect(stringPaths.length).toBeGreaterThan(50);
    let differ = 0;
    for (const path of stringPaths) {
      for (const text of near) {
        const data = clone(plan) as Record<string, unknown>;
        let parent: unknown = data;
        for (const k of path.slice(0, -1)) parent = (parent as Record<string | number, unknown>)[k];
        (parent as Record<string | number, unknown>)[path[path.length - 1]!] = text;
        const want = verdict(atRunTime, data);
        expect(verdict(ahead, data)).toEqual(want);
        if (want.ok !== verdict(atRunTime, plan).ok) differ++;
      }
    }
    // some of the strings break a limit, so limits were compared, not only passes
    expect(differ).toBeGreaterThan(0);
  });
});
