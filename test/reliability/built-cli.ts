/**
 * The built command line for tests that spawn it: `tsc -p tsconfig.build.json` into a private
 * folder (so that another test file rebuilding dist/ at the same moment can never hand us a
 * half-written module), with the repository's node_modules linked beside it. Runs are bounded
 * in time (20 s) and memory (--max-old-space-size=512).
 */
import { execFileSync, spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";

export const ROOT = resolve(new URL("../../", import.meta.url).pathname);

/** Node flags every spawned run gets: a memory ceiling, so that a blow-up fails instead of swapping. */
export const NODE_FLAGS = ["--max-old-space-size=512"];
/** Time limit of one run (ms). Not an assertion on speed: a run that hits it counts as a hang. */
export const RUN_TIMEOUT = 20_000;

export interface BuiltCli {
  /** Absolute path of the built main.js. */
  readonly main: string;
  /** Remove the private build. */
  readonly dispose: () => void;
}

/** Build the CLI into a fresh temporary folder (about ten seconds). */
export function buildCli(): BuiltCli {
  const dir = mkdtempSync(join(tmpdir(), "sidcarve-build-"));
  writeFileSync(join(dir, "package.json"), JSON.stringify({ name: "sidcarve-test-build", private: true, type: "module" }) + "\n");
  symlinkSync(join(ROOT, "node_modules"), join(dir, "node_modules"), "dir");
  const main = join(dir, "dist", "cli", "main.js");
  try {
    execFileSync("npx", ["tsc", "-p", "tsconfig.build.json", "--outDir", join(dir, "dist")], { cwd: ROOT, stdio: "pipe" });
  } catch (e) {
    // tsc still emits when some file has a type error (`npm test` reports those separately);
    // only a build that produced no CLI is fatal here.
    if (!existsSync(main)) throw e;
  }
  return { main, dispose: () => rmSync(dir, { recursive: true, force: true }) };
}

export interface Run {
  readonly args: readonly string[];
  /** Exit code; null when killed (e.g. by the time limit). */
  readonly code: number | null;
  readonly signal: NodeJS.Signals | null;
  readonly stdout: string;
  readonly stderr: string;
  /** True when the run hit RUN_TIMEOUT. */
  readonly timedOut: boolean;
}

/** Run the CLI to completion (bounded by RUN_TIMEOUT). */
export function runCli(main: string, args: readonly string[], cwd: string): Run {
  const r = spawnSync(process.execPath, [...NODE_FLAGS, main, ...args], {
    cwd,
    encoding: "utf8",
    timeout: RUN_TIMEOUT,
    maxBuffer: 64 * 1024 * 1024,
    env: { ...process.env, NO_COLOR: "1" },
  });
  const timedOut = (r.error as NodeJS.ErrnoException | undefined)?.code === "ETIMEDOUT";
  return { args, code: r.status, signal: r.signal, stdout: r.stdout ?? "", stderr: r.stderr ?? "", timedOut };
}

/** Start the CLI without waiting (for tests that kill it). */
export function startCli(main: string, args: readonly string[], cwd: string): ChildProcess {
  return spawn(process.execPath, [...NODE_FLAGS, main, ...args], { cwd, stdio: ["ignore", "ignore", "pipe"], env: { ...process.env, NO_COLOR: "1" } });
}

/** Lines of stderr that look like a stack trace. */
export function stackLines(s: string): string[] {
  return s.split("\n").filter((l) => /^\s{4}at /.test(l));
}
