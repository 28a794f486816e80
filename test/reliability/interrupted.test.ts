/**
 * Interrupted and concurrent runs: `allocate` and `emit --out` killed with SIGKILL at varied
 * moments (some while the temporary file is being written) leave the target either with its old
 * bytes or with the complete new bytes, never a mix, and at most one stray `.NAME.tmp-*` file per
 * killed run; two `allocate` runs on one lock at the same time never corrupt it or lose values.
 */
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { basename, dirname, join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseLock } from "../../src/alloc/lock.js";
import { gridPlan } from "./big-plan.js";
import { type BuiltCli, type Run, buildCli, runCli, startCli } from "./built-cli.js";

let built: BuiltCli;
const temps: string[] = [];
function tempDir(): string {
  const d = mkdtempSync(join(tmpdir(), "sidcarve-kill-"));
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

const GRID = { sites: 16, routersPerSite: 60 };

/** Stray temporary files of `target` (the names writeAtomic gives them). */
const strays = (target: string) => readdirSync(dirname(target)).filter((f) => f.startsWith(`.${basename(target)}.tmp-`));

interface Kill {
  /** Kill this many ms after the temporary file appeared, or ... */
  readonly afterTmp?: number;
  /** ... this many ms after the start. */
  readonly afterStart?: number;
}

/**
 * Start the CLI, kill it with SIGKILL at the moment `kill` says, and report whether a temporary
 * file existed when the signal was sent. Resolves when the process is gone.
 */
function runAndKill(args: readonly string[], cwd: string, target: string, kill: Kill): Promise<{ tmpSeen: boolean; finished: boolean }> {
  return new Promise((resolvePromise) => {
    const child = startCli(built.main, args, cwd);
    let exited = false;
    let tmpSeen = false;
    let sent = false;
    const send = () => {
      if (sent || exited) return;
      sent = true;
      tmpSeen = strays(target).length > 0;
      child.kill("SIGKILL");
    };
    child.on("exit", () => {
      exited = true;
      clearInterval(poll);
      clearTimeout(timer);
      resolvePromise({ tmpSeen, finished: !sent });
    });
    let timer: NodeJS.Timeout | undefined;
    if (kill.afterStart !== undefined) timer = setTimeout(send, kill.afterStart);
    // poll for the temporary file; a tight interval so that the kill lands inside the write
    const poll = setInterval(() => {
      if (kill.afterTmp !== undefined && !sent && strays(target).length > 0) {
        clearInterval(poll);
        if (kill.afterTmp === 0) send();
        else timer = setTimeout(send, kill.afterTmp);
      }
    }, 1);
    // never wait for ever: the run's own time limit
    setTimeout(send, 20_000).unref();
  });
}

/** A folder with the grid plan (old form), its lock and its CSV table, plus the bytes a full new run writes. */
function prepare(): { dir: string; plan: string; lock: string; out: string; csv: string; oldLock: Buffer; newLock: Buffer; oldCsv: Buffer; newCsv: Buffer } {
  const dir = tempDir();
  const plan = join(dir, "grid.yaml");
  const lock = join(dir, "grid.lock.json");
  const out = join(dir, "tables");
  const csv = join(out, "millrace-grid.sids.csv");
  const ok = (r: Run) => expect({ code: r.code, stderr: r.stderr }).toEqual({ code: 0, stderr: "" });
  writeFileSync(plan, gridPlan(GRID));
  ok(runCli(built.main, ["allocate", plan], dir));
  ok(runCli(built.main, ["emit", plan, "--format", "csv", "--out", out], dir));
  const oldLock = readFileSync(lock);
  const oldCsv = readFileSync(csv);
  // the new plan adds a reach; its full results, made once in a side folder
  writeFileSync(plan, gridPlan({ ...GRID, sites: GRID.sites + 1 }));
  const side = join(dir, "side");
  const sideLock = join(side, "grid.lock.json");
  ok(runCli(built.main, ["allocate", plan, "--lock", sideLock], dir));
  ok(runCli(built.main, ["emit", plan, "--lock", sideLock, "--format", "csv", "--out", side], dir));
  const newLock = readFileSync(sideLock);
  const newCsv = readFileSync(join(side, "millrace-grid.sids.csv"));
  expect(newLock.equals(oldLock)).toBe(false);
  expect(newCsv.equals(oldCsv)).toBe(false);
  return { dir, plan, lock, out, csv, oldLock, newLock, oldCsv, newCsv };
}

/** Kill moments: right when the temporary file appears, a little later, and at fixed points after the start. */
const KILLS: readonly Kill[] = [{ afterTmp: 0 }, { afterTmp: 0 }, { afterTmp: 2 }, { afterTmp: 6 }, { afterStart: 300 }, { afterStart: 1200 }];

describe("a run killed with SIGKILL leaves the previous file or the complete new one", () => {
  it("allocate: the lock is the old bytes or the new bytes, and it always parses", async () => {
    const p = prepare();
    let midWrite = 0;
    for (const kill of KILLS) {
      writeFileSync(p.lock, p.oldLock);
      for (const f of strays(p.lock)) rmSync(join(p.dir, f));
      const r = await runAndKill(["allocate", p.plan], p.dir, p.lock, kill);
      const now = readFileSync(p.lock);
      expect(now.equals(p.oldLock) || now.equals(p.newLock), `lock after a kill ${JSON.stringify(kill)} is neither the old nor the new bytes (${now.length} bytes)`).toBe(true);
      expect(parseLock(now.toString("utf8"), p.lock, "millrace-grid").ok).toBe(true);
      expect(strays(p.lock).length).toBeLessThanOrEqual(1);
      if (r.tmpSeen) midWrite++;
    }
    // the busy marker and the temporary file a killed run left do not block the next run
    writeFileSync(p.lock, p.oldLock);
    const again = runCli(built.main, ["allocate", p.plan], p.dir);
    expect(again.code, again.stderr).toBe(0);
    expect(readFileSync(p.lock).equals(p.newLock)).toBe(true);
    expect(existsSync(`${p.lock}.busy`)).toBe(false);
    // at least one kill landed while the temporary file was there, so the test saw a real interrupted write
    expect(midWrite).toBeGreaterThan(0);
  }, 240_000);

  it("emit --out: the table is the old bytes or the new bytes", async () => {
    const p = prepare();
    // the new lock in place, the old table in the folder
    writeFileSync(p.lock, p.newLock);
    let midWrite = 0;
    for (const kill of KILLS) {
      writeFileSync(p.csv, p.oldCsv);
      for (const f of strays(p.csv)) rmSync(join(p.out, f));
      const r = await runAndKill(["emit", p.plan, "--format", "csv", "--out", p.out], p.dir, p.csv, kill);
      const now = readFileSync(p.csv);
      expect(now.equals(p.oldCsv) || now.equals(p.newCsv), `table after a kill ${JSON.stringify(kill)} is neither the old nor the new bytes (${now.length} bytes)`).toBe(true);
      expect(strays(p.csv).length).toBeLessThanOrEqual(1);
      if (r.tmpSeen) midWrite++;
    }
    // a later run is not confused by a stray temporary file
    writeFileSync(p.csv, p.oldCsv);
    expect(runCli(built.main, ["emit", p.plan, "--format", "csv", "--out", p.out], p.dir).code).toBe(0);
    expect(readFileSync(p.csv).equals(p.newCsv)).toBe(true);
    expect(midWrite).toBeGreaterThan(0);
  }, 240_000);
});

describe("two allocate runs at the same time", () => {
  /** Run both at once; resolves with their records. */
  function both(a: readonly string[], b: readonly string[], cwd: string): Promise<[Run, Run]> {
    const one = (args: readonly string[]) =>
      new Promise<Run>((res) => {
        const child = startCli(built.main, args, cwd);
        let stderr = "";
        child.stderr!.on("data", (d: Buffer) => (stderr += d.toString("utf8")));
        child.on("exit", (code, signal) => res({ args, code, signal, stdout: "", stderr, timedOut: false }));
      });
    return Promise.all([one(a), one(b)]);
  }

  const refusedForOther = (r: Run) => r.code === 2 && /lock changed while this run was working|in use by another sidcarve run/.test(r.stderr);

  it("on the same plan: the lock always parses, and each run succeeds or refuses because of the other", async () => {
    const dir = tempDir();
    const plan = join(dir, "grid.yaml");
    const lock = join(dir, "grid.lock.json");
    writeFileSync(plan, gridPlan({ sites: 4, routersPerSite: 30 }));
    for (let i = 0; i < 8; i++) {
      if (i % 2 === 0) rmSync(lock, { force: true }); // half the rounds start without a lock
      const [a, b] = await both(["allocate", plan], ["allocate", plan], dir);
      for (const r of [a, b]) expect(r.code === 0 || refusedForOther(r), JSON.stringify(r)).toBe(true);
      expect(a.code === 0 || b.code === 0, "at least one run succeeds").toBe(true);
      expect(parseLock(readFileSync(lock, "utf8"), lock, "millrace-grid").ok).toBe(true);
      expect(existsSync(`${lock}.busy`)).toBe(false);
    }
  }, 240_000);

  it("with two different edits sharing one lock: no run's values are lost", async () => {
    const dir = tempDir();
    const base = { sites: 4, routersPerSite: 30 };
    const lock = join(dir, "shared.lock.json");
    const planA = join(dir, "a.yaml");
    const planB = join(dir, "b.yaml");
    writeFileSync(join(dir, "base.yaml"), gridPlan(base));
    expect(runCli(built.main, ["allocate", join(dir, "base.yaml"), "--lock", lock], dir).code).toBe(0);
    const baseLock = readFileSync(lock);
    // each edit adds routers of its own to the last reach
    writeFileSync(planA, gridPlan({ ...base, extraRouters: 3, extraPrefix: "a" }));
    writeFileSync(planB, gridPlan({ ...base, extraRouters: 3, extraPrefix: "b" }));
    for (let i = 0; i < 8; i++) {
      writeFileSync(lock, baseLock);
      const [a, b] = await both(["allocate", planA, "--lock", lock], ["allocate", planB, "--lock", lock], dir);
      for (const r of [a, b]) expect(r.code === 0 || refusedForOther(r), JSON.stringify(r)).toBe(true);
      const final = parseLock(readFileSync(lock, "utf8"), lock, "millrace-grid");
      expect(final.ok).toBe(true);
      if (!final.ok) continue;
      // a router is kept when it holds a value or, if a later run's plan dropped it, when its value is retired
      const kept = new Set([...final.lock.nodes.keys(), ...final.lock.retired.filter((r) => r.kind === "node").map((r) => r.was)]);
      const hasA = [31, 32, 33].every((k) => kept.has(`reach4-a${k}`));
      const hasB = [31, 32, 33].every((k) => kept.has(`reach4-b${k}`));
      // a run that said it wrote the lock must find its routers there: nothing it reported is lost
      if (a.code === 0) expect(hasA, `run A succeeded but its routers are not in the lock (round ${i})`).toBe(true);
      if (b.code === 0) expect(hasB, `run B succeeded but its routers are not in the lock (round ${i})`).toBe(true);
      expect(a.code === 0 || b.code === 0).toBe(true);
    }
  }, 240_000);
});
