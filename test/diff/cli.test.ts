/**
 * `sidcarve diff` through the built command line: plans with their locks and CSV/JSON tables in
 * any mix, exit 0 for additions only, 1 for anything removed (unless accepted), 2 for bad input,
 * and JSON that the published schema accepts.
 */
import { copyFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stringify } from "yaml";
import { DIFF_SCHEMA } from "../../src/diff/schema.js";
import { basePlan } from "../helpers/plans.js";
import { type BuiltCli, ROOT, type Run, buildCli, runCli, stackLines } from "../reliability/built-cli.js";

let built: BuiltCli;
let dir: string;
const run = (...args: string[]) => runCli(built.main, args, dir);

function plan(edit: (p: Record<string, unknown>) => void = () => {}): Record<string, unknown> {
  const p = basePlan({ vrfs: [{ name: "tills", families: ["ipv4"], pes: ["r1", "r4"] }] });
  edit(p);
  return p;
}

/** Write a plan and allocate it (its lock goes beside it). */
function allocated(name: string, p: Record<string, unknown>): string {
  const file = join(dir, name);
  writeFileSync(file, stringify(p));
  expect(run("allocate", file).code).toBe(0);
  return file;
}

function usage(r: Run): Run {
  expect(r.code, JSON.stringify(r, null, 2)).toBe(2);
  expect(r.stderr.trim()).not.toBe("");
  expect(stackLines(r.stderr)).toEqual([]);
  expect(r.stdout).toBe("");
  return r;
}

beforeAll(() => {
  built = buildCli();
  dir = mkdtempSync(join(tmpdir(), "sidcarve-diff-"));
}, 180_000);

afterAll(() => {
  built?.dispose();
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe("sidcarve diff", () => {
  it("finds no difference between a plan and its own CSV and JSON tables (exit 0)", () => {
    const p = allocated("same.yaml", plan());
    writeFileSync(join(dir, "same.csv"), run("emit", p, "--format", "csv").stdout);
    writeFileSync(join(dir, "same.json"), run("emit", p, "--format", "json").stdout);
    for (const [a, b] of [
      [p, "same.csv"],
      ["same.csv", "same.json"],
      ["same.json", p],
    ]) {
      const r = run("diff", a!, b!);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toMatch(/^no differences/m);
    }
  });

  it("exits 0 when the new plan only adds a router (locks given with --old-lock/--new-lock)", () => {
    const old = allocated("grow-old.yaml", plan());
    const next = join(dir, "grow-new.yaml");
    writeFileSync(next, stringify(plan((p) => (p.nodes as unknown[]).push({ name: "r5", place: "south/dock" }))));
    // the new plan's lock starts as a copy of the old one, then allocate adds r5's values
    copyFileSync(join(dir, "grow-old.lock.json"), join(dir, "proposed.lock.json"));
    expect(run("allocate", next, "--lock", join(dir, "proposed.lock.json")).code).toBe(0);
    const r = run("diff", old, next, "--old-lock", join(dir, "grow-old.lock.json"), "--new-lock", join(dir, "proposed.lock.json"));
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/│ r5 +│ added/);
    expect(r.stdout).toMatch(/^only additions/m);
    expect(r.stdout).not.toMatch(/^ {2}- /m);
  });

  it("exits 1 when a PE leaves a VRF, and 0 with --accept-disruption; the report names the VRF", () => {
    const old = allocated("shrink-old.yaml", plan());
    writeFileSync(join(dir, "shrink-old.csv"), run("emit", old, "--format", "csv").stdout);
    copyFileSync(join(dir, "shrink-old.lock.json"), join(dir, "shrink-new.lock.json"));
    const next = allocated("shrink-new.yaml", plan((p) => ((p.vrfs as { pes: string[] }[])[0]!.pes = ["r1"])));
    const r = run("diff", "shrink-old.csv", next);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stdout).toMatch(/^ {2}- sid \S+ End\.DT4 .*\[vrf tills\]$/m);
    expect(r.stdout).toMatch(/^disruptive: 1 SID removed/m);
    const accepted = run("diff", "shrink-old.csv", next, "--accept-disruption");
    expect(accepted.code).toBe(0);
    expect(accepted.stdout.replace(/^disruptive: .*$/m, "")).toBe(r.stdout.replace(/^disruptive: .*$/m, ""));
  });

  it("writes JSON that schemas/diff.schema.json accepts, and that file is the schema object", () => {
    const published = JSON.parse(readFileSync(join(ROOT, "schemas", "diff.schema.json"), "utf8"));
    expect(published).toEqual(JSON.parse(JSON.stringify(DIFF_SCHEMA)));
    const validate = new Ajv2020({ allErrors: true, strict: true }).compile(published);
    const old = join(dir, "shrink-old.csv");
    const next = join(dir, "shrink-new.yaml");
    const r = run("diff", old, next, "--format", "json");
    expect(r.code).toBe(1);
    const doc = JSON.parse(r.stdout);
    expect(validate(doc), JSON.stringify(validate.errors)).toBe(true);
    expect(doc.old.kind).toBe("csv");
    expect(doc.new.kind).toBe("plan");
    expect(doc.counts.sidsRemoved).toBe(1);
    expect(doc.nodes[0].sids[0].touches).toEqual([{ kind: "vrf", name: "tills" }]);
    const same = run("diff", old, old, "--format", "json");
    expect(same.code).toBe(0);
    expect(validate(JSON.parse(same.stdout))).toBe(true);
  });

  it("refuses bad input with exit 2 and a located message", () => {
    const good = join(dir, "same.csv");
    // a table with one bad row: a diff over the rest would show that row as removed
    const lines = readFileSync(good, "utf8").split("\r\n");
    const badRowLine = 4;
    lines[badRowLine - 1] = lines[badRowLine - 1]!.replace(/,5f00:[^,]*,End/, ",5f00::zz,End");
    writeFileSync(join(dir, "bad-row.csv"), lines.join("\r\n"));
    const r = usage(run("diff", good, "bad-row.csv"));
    expect(r.stderr).toContain(`bad-row.csv:${badRowLine} (row 2, column sid)`);
    expect(r.stderr).toContain("5f00::zz");

    expect(usage(run("diff", good, "notes.txt")).stderr).toMatch(/cannot tell what it is/);
    expect(usage(run("diff", good, "missing.csv")).stderr).toMatch(/missing\.csv: no such file/);
    expect(usage(run("diff", join(dir, "same.lock.json"), good)).stderr).toMatch(/is a lock file/);
    expect(usage(run("diff", good, good, "--old-lock", join(dir, "same.lock.json"))).stderr).toMatch(/--old-lock is for a plan/);
    writeFileSync(join(dir, "no-lock.yaml"), stringify(plan()));
    expect(usage(run("diff", "no-lock.yaml", good)).stderr).toMatch(/no lock yet/);
    writeFileSync(join(dir, "header-only.csv"), "node,behavior\n");
    expect(usage(run("diff", "header-only.csv", good)).stderr).toMatch(/header-only\.csv.*required column.*sid/);
    expect(usage(run("diff", good, good, "--format", "yaml")).code).toBe(2);
  });
});
