/**
 * The rule registry is complete in the ESLint manner: every rule has its own file named by its
 * id, a test file, an entry in docs/rules.md (written from the metadata), and every rule file is
 * registered.
 */
import { existsSync, readFileSync, readdirSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { rulesMarkdown } from "../../src/lint/rules-doc.js";
import { ALL_RULES, RULES } from "../../src/lint/rules/index.js";

const root = new URL("../../", import.meta.url);

describe("rule registry", () => {
  it("every rule has its file, its test file and metadata that names a source", () => {
    for (const [id, rule] of Object.entries(RULES)) {
      expect(rule.meta.id).toBe(id);
      expect(existsSync(new URL(`src/lint/rules/${id}.ts`, root)), `src/lint/rules/${id}.ts`).toBe(true);
      expect(existsSync(new URL(`test/lint/rules/${id}.test.ts`, root)), `test/lint/rules/${id}.test.ts`).toBe(true);
      expect(rule.meta.summary.length).toBeGreaterThan(10);
      expect(rule.meta.rationale.length).toBeGreaterThan(20);
      expect(rule.meta.source).toMatch(/RFC \d+|IANA|common practice/);
    }
  });
  it("every rule file is registered", () => {
    const files = readdirSync(new URL("src/lint/rules/", root)).filter((f) => f.endsWith(".ts") && f !== "index.ts").map((f) => f.replace(/\.ts$/, ""));
    const helperOnly = files.filter((f) => !(f in RULES));
    expect(helperOnly).toEqual([]);
  });
  it("ids are unique kebab-case words of our own", () => {
    const ids = ALL_RULES.map((r) => r.meta.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const id of ids) expect(id).toMatch(/^[a-z]+(-[a-z0-9]+)*$/);
  });
  it("docs/rules.md is current (npm run docs)", () => {
    expect(readFileSync(new URL("docs/rules.md", root), "utf8")).toBe(rulesMarkdown());
  });
});
