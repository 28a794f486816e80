/**
 * Nothing lost: a lock that was edited by hand, truncated, or belongs to another plan stops every
 * command with exit 2 and a clear message, and nothing is written (the lock's bytes and the output
 * folder stay as they were); `--out` never overwrites or deletes a file sidcarve did not write
 * unless --force is given.
 */
import { createHash } from "node:crypto";
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, readlinkSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { hostname, tmpdir } from "node:os";
import { join, relative } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { stringify } from "yaml";
import { basePlan } from "../helpers/plans.js";
import { type BuiltCli, type Run, buildCli, runCli, stackLines } from "./built-cli.js";

let built: BuiltCli;
const temps: string[] = [];

function tempDir(): string {
  const d = mkdtempSync(join(tmpdir(), "sidcarve-lost-"));
  temps.push(d);
  return d;
}

beforeAll(() => {
  built = buildCli();
}, 180_000);

afterAll(() => {
  built?.dispose();
  for (const d of temps) rmSync(d, { recursive: true, force: true });
});

/** Every file under `dir` (links as links) with its bytes or link target: the whole state to compare. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      const rel = relative(dir, p);
      if (e.isSymbolicLink()) out[rel] = `link -> ${readlinkSync(p)}`;
      else if (e.isDirectory()) {
        out[rel + "/"] = "dir";
        walk(p);
      } else out[rel] = createHash("sha256").update(readFileSync(p)).digest("hex");
    }
  };
  walk(dir);
  return out;
}

/** One refusal: exit 2, the expected code on stderr beside the file it is about, no stack trace, nothing on stdout. */
function refused(r: Run, code: string, file: string): void {
  expect(r.code, JSON.stringify(r, null, 2)).toBe(2);
  const diag = r.stderr.split("\n").filter((l) => l.includes(`[${code}]`));
  expect(diag, r.stderr).toHaveLength(1);
  expect(diag[0]).toContain(file);
  expect(diag[0]).toMatch(/nothing was written/);
  expect(stackLines(r.stderr)).toEqual([]);
}

/** A folder with an allocated plan and its emitted tables. */
function setup(): { dir: string; plan: string; lock: string; out: string } {
  const dir = tempDir();
  const plan = join(dir, "grid.yaml");
  writeFileSync(plan, stringify(basePlan({ plan: "grid", vrfs: [{ name: "tills", families: ["ipv4"], pes: ["r1", "r4"] }] })));
  const lock = join(dir, "grid.lock.json");
  const out = join(dir, "tables");
  expect(runCli(built.main, ["allocate", plan], dir).code).toBe(0);
  expect(runCli(built.main, ["emit", plan, "--format", "csv", "--per-node", "--out", out], dir).code).toBe(0);
  return { dir, plan, lock, out };
}

/** Run every command that reads the lock and check that each refuses and nothing changes. */
function everyCommandRefuses(s: ReturnType<typeof setup>, code: string): void {
  // the plan grows, so that a run that ignored the damage would have something to write
  const text = readFileSync(s.plan, "utf8");
  writeFileSync(s.plan, text.replace("nodes:\n", "nodes:\n  - name: r9\n    place: south/dock\n"));
  const before = snapshot(s.dir);
  const runs: string[][] = [
    ["allocate", s.plan],
    ["allocate", s.plan, "--allow-renumber"],
    ["emit", s.plan, "--format", "csv", "--per-node", "--out", s.out],
    ["emit", s.plan, "--format", "json", "--out", s.out],
    ["release", s.plan, "--all"],
    ["decode", "5f00:0:100::", "--plan", s.plan],
    ["diff", s.plan, s.plan],
  ];
  for (const args of runs) refused(runCli(built.main, args, s.dir), code, s.lock);
  expect(snapshot(s.dir)).toEqual(before);
}

describe("a damaged or foreign lock stops every command and nothing is written", () => {
  it("a value changed by hand (the digest no longer matches)", () => {
    const s = setup();
    const text = readFileSync(s.lock, "utf8");
    const edited = text.replace(/(End\|plain": ")0x([0-9a-f]+)"/, (_m, k: string, v: string) => `${k}0x${(parseInt(v, 16) + 7).toString(16)}"`);
    expect(edited).not.toBe(text);
    writeFileSync(s.lock, edited);
    everyCommandRefuses(s, "lock/digest");
  });

  it("a truncated lock (half of it, and all but the last byte)", () => {
    for (const cut of [0.5, -1]) {
      const s = setup();
      const bytes = readFileSync(s.lock);
      writeFileSync(s.lock, bytes.subarray(0, cut < 0 ? bytes.length + cut - 1 : Math.floor(bytes.length * cut)));
      everyCommandRefuses(s, "lock/unreadable");
    }
  });

  it("an empty lock file", () => {
    const s = setup();
    writeFileSync(s.lock, "");
    everyCommandRefuses(s, "lock/unreadable");
  });

  it("the lock of another plan", () => {
    const s = setup();
    const other = join(s.dir, "other.yaml");
    writeFileSync(other, stringify(basePlan({ plan: "elsewhere" })));
    expect(runCli(built.main, ["allocate", other], s.dir).code).toBe(0);
    writeFileSync(s.lock, readFileSync(join(s.dir, "other.lock.json")));
    everyCommandRefuses(s, "lock/other-plan");
  });

  it("a lock edited into an inconsistent state with its digest recomputed (two SIDs given one value)", () => {
    const s = setup();
    const data = JSON.parse(readFileSync(s.lock, "utf8"));
    const fns = data.functions.r2 as Record<string, string>;
    const [first, second] = Object.keys(fns).filter((k) => k.startsWith("0|End.X|"));
    fns[second!] = fns[first!]!;
    // the digest as lock.ts documents it: sha256 over the JSON text of the lock without "digest"
    delete data.digest;
    data.digest = "sha256:" + createHash("sha256").update(JSON.stringify(data)).digest("hex");
    writeFileSync(s.lock, JSON.stringify(data, null, 2) + "\n");
    const before = snapshot(s.dir);
    const r = runCli(built.main, ["allocate", s.plan], s.dir);
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr, r.stderr).toMatch(/\[alloc\/lock-conflict\]/);
    expect(stackLines(r.stderr)).toEqual([]);
    expect(runCli(built.main, ["emit", s.plan, "--format", "csv", "--per-node", "--out", s.out], s.dir).code).toBe(2);
    expect(snapshot(s.dir)).toEqual(before);
  });
});

describe("the busy marker of allocate", () => {
  it("refuses while another live run holds <lock>.busy, and takes over the marker of a run that died", () => {
    const s = setup();
    const marker = `${s.lock}.busy`;
    const text = readFileSync(s.plan, "utf8");
    writeFileSync(s.plan, text.replace("nodes:\n", "nodes:\n  - name: r9\n    place: south/dock\n"));
    // this test process is alive: its marker stands for a run that is still working
    writeFileSync(marker, `${process.pid} ${hostname()}\n`);
    const before = snapshot(s.dir);
    const r = runCli(built.main, ["allocate", s.plan], s.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/in use by another sidcarve run.*nothing was written/);
    expect(r.stderr).toContain(marker);
    expect(snapshot(s.dir)).toEqual(before);
    // a process number that cannot be running (above PID_MAX_LIMIT, 2^22 on 64-bit Linux; value from memory): taken over
    writeFileSync(marker, `${2 ** 22 + 1} ${hostname()}\n`);
    const again = runCli(built.main, ["allocate", s.plan], s.dir);
    expect(again.code, again.stderr).toBe(0);
    expect(existsSync(marker)).toBe(false);
    expect(readFileSync(s.lock, "utf8")).toContain('"r9"');
  });
});

describe("--out writes only sidcarve's own files", () => {
  it("refuses to overwrite a file it did not write, keeps every other file, and overwrites only with --force", () => {
    const s = setup();
    const target = join(s.out, "grid.sids.csv");
    writeFileSync(target, "my notes, not a SID table\n");
    writeFileSync(join(s.out, "README.txt"), "hand-written\n");
    const before = snapshot(s.dir);
    const r = runCli(built.main, ["emit", s.plan, "--format", "csv", "--out", s.out], s.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/was not written by sidcarve; refusing to overwrite it \(use --force to allow\)/);
    expect(snapshot(s.dir)).toEqual(before);
    const forced = runCli(built.main, ["emit", s.plan, "--format", "csv", "--out", s.out, "--force"], s.dir);
    expect(forced.code, forced.stderr).toBe(0);
    expect(readFileSync(target, "utf8")).toMatch(/^# sidcarve SID table/);
    // nothing else in the folder was touched or removed
    const after = snapshot(s.dir);
    for (const [k, v] of Object.entries(before)) if (k !== relative(s.dir, target)) expect(after[k], k).toBe(v);
  });

  it("rewrites its own files again and again without --force", () => {
    const s = setup();
    for (let i = 0; i < 2; i++) expect(runCli(built.main, ["emit", s.plan, "--format", "csv", "--per-node", "--out", s.out], s.dir).code).toBe(0);
  });

  it("refuses a per-node file that someone else wrote, and leaves it as it was", () => {
    const s = setup();
    writeFileSync(join(s.out, "r1.csv"), "r1 is being rebuilt, do not touch\n");
    const before = snapshot(s.dir);
    const r = runCli(built.main, ["emit", s.plan, "--format", "csv", "--per-node", "--out", s.out], s.dir);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("r1.csv");
    expect(snapshot(s.dir)).toEqual(before);
  });

  it("does not write through a link to someone else's file", () => {
    const s = setup();
    const outside = join(s.dir, "precious.csv");
    writeFileSync(outside, "someone else's table\n");
    const link = join(s.out, "grid.sids.csv");
    if (existsSync(link)) rmSync(link);
    symlinkSync(outside, link);
    const before = snapshot(s.dir);
    expect(runCli(built.main, ["emit", s.plan, "--format", "csv", "--out", s.out], s.dir).code).toBe(2);
    expect(snapshot(s.dir)).toEqual(before);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
  });

  it("refuses a folder where its file should go", () => {
    const s = setup();
    mkdirSync(join(s.out, "grid.sids.json"));
    writeFileSync(join(s.out, "grid.sids.json", "keep.txt"), "inside\n");
    const before = snapshot(s.dir);
    const r = runCli(built.main, ["emit", s.plan, "--format", "json", "--out", s.out], s.dir);
    expect(r.code, r.stderr).toBe(2);
    expect(stackLines(r.stderr)).toEqual([]);
    expect(snapshot(s.dir)).toEqual(before);
  });
});
