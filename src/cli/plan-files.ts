/**
 * Loading a plan and its lock from disk for the commands, with every failure as a UsageError
 * carrying located diagnostics.
 */
import { basename, dirname, join } from "node:path";
import { Worker } from "node:worker_threads";
import { type Lock, parseLock } from "../alloc/lock.js";
import { type LockParts, lockFromParts } from "../alloc/lock-parts.js";
import { type Allocation, type AllocateOptions, allocate } from "../alloc/allocate.js";
import { loadPlanBytes } from "../plan/load.js";
import type { Plan } from "../plan/model.js";
import { UsageError, readBytesIfExists, readInput, readSharedIfExists } from "./io.js";

/** The lock file that belongs to a plan: beside it, `<name>.lock.json`, unless given. */
export function lockPathFor(planFile: string, explicit?: string): string {
  if (explicit) return explicit;
  const base = basename(planFile).replace(/\.(ya?ml|json)$/i, "");
  return join(dirname(planFile), `${base}.lock.json`);
}

export function loadPlanFile(file: string): Plan {
  const r = loadPlanBytes(readInput(file), file);
  if (!r.ok) throw new UsageError(`${file}: the plan has ${r.diagnostics.length} problem${r.diagnostics.length === 1 ? "" : "s"}`, r.diagnostics);
  return r.plan;
}

/** Read the plan's lock; undefined when there is none yet. The raw bytes are returned for the change check. */
export function loadLock(plan: Plan, lockFile: string): { lock: Lock | undefined; bytes: Buffer | undefined } {
  const bytes = readBytesIfExists(lockFile);
  if (bytes === undefined) return { lock: undefined, bytes };
  const r = parseLock(bytes, lockFile, plan.name);
  if (!r.ok) throw new UsageError(`${lockFile}: the lock cannot be used`, r.diagnostics);
  return { lock: r.lock, bytes };
}

/** Locks at least this large are read in a worker thread while the plan loads; a smaller one is read sooner than a thread starts. */
export const LOCK_WORKER_BYTES = 4 * 1024 * 1024;

/**
 * Read a plan and its lock, the lock (if large) read by the fast reader in a worker thread while
 * the plan loads on this one. Same answers and the same errors, in the same order, as loadPlanFile
 * then loadLock: a lock that cannot be read is reported after the plan. `workerBytes`: the size
 * from which the worker is used (Infinity: never).
 */
export async function loadPlanAndLock(planFile: string, lockFile: string, workerBytes = LOCK_WORKER_BYTES): Promise<{ plan: Plan; lock: Lock | undefined; bytes: Buffer | undefined }> {
  let bytes: Buffer | undefined;
  let unreadable: unknown;
  try {
    bytes = readSharedIfExists(lockFile, workerBytes);
  } catch (e) {
    unreadable = e;
  }
  const reading = bytes !== undefined && bytes.length >= workerBytes && bytes.buffer instanceof SharedArrayBuffer ? readLockInWorker(bytes) : undefined;
  try {
    const plan = loadPlanFile(planFile);
    if (unreadable !== undefined) throw unreadable;
    if (bytes === undefined) return { plan, lock: undefined, bytes };
    const r = parseLock(bytes, lockFile, plan.name, reading ? await reading.lock : undefined);
    if (!r.ok) throw new UsageError(`${lockFile}: the lock cannot be used`, r.diagnostics);
    return { plan, lock: r.lock, bytes };
  } finally {
    reading?.stop();
  }
}

/**
 * readLockFast of `bytes` (in shared memory) in a worker thread: `{ lock }`, the lock or undefined
 * when the fast reader is not sure of the bytes; undefined itself when the thread fails or cannot
 * start (the caller then reads the lock on its own thread).
 */
export function readLockInWorker(bytes: Buffer): { lock: Promise<{ lock: Lock | undefined } | undefined>; stop(): void } {
  let worker: Worker | undefined;
  const lock = new Promise<{ lock: Lock | undefined } | undefined>((resolve) => {
    try {
      worker = new Worker(new URL("./lock-read-worker.js", import.meta.url), { workerData: { buffer: bytes.buffer, length: bytes.length } });
    } catch {
      resolve(undefined);
      return;
    }
    worker.once("message", (m: LockParts | null) => resolve({ lock: m === null ? undefined : lockFromParts(m, bytes) }));
    worker.once("error", () => resolve(undefined));
    worker.once("exit", () => resolve(undefined));
  });
  return { lock, stop: () => void worker?.terminate() };
}

/** Allocate, turning refusals into a UsageError that lists every move. */
export function allocateOrFail(plan: Plan, lock: Lock | undefined, options: AllocateOptions): Allocation {
  const r = allocate(plan, lock, options);
  if (r.ok) return r.allocation;
  if (r.moves.length > 0 && r.diagnostics.length === 0) {
    const lines = r.moves.map((m) => `  ${m.what}: ${m.from} -> ${m.to} (${m.reason})`);
    throw new UsageError(`${plan.file}: this edit would renumber ${r.moves.length} locked value${r.moves.length === 1 ? "" : "s"}:\n${lines.join("\n")}\nNothing was written. Re-run with --allow-renumber to accept (old values are retired, not reused).`);
  }
  throw new UsageError(`${plan.file}: allocation failed`, r.diagnostics);
}

/** For emit and decode: the plan and the allocation already in its lock (see lockedAllocation), the lock read beside the plan. */
export async function loadLockedAllocation(planFile: string, lockFile: string): Promise<{ plan: Plan; allocation: Allocation }> {
  const { plan, lock } = await loadPlanAndLock(planFile, lockFile);
  return { plan, allocation: allocationInLock(plan, lock, lockFile) };
}

/** For emit/decode: the allocation must already be in the lock (nothing new, nothing retired). */
export function lockedAllocation(plan: Plan, lockFile: string): Allocation {
  return allocationInLock(plan, loadLock(plan, lockFile).lock, lockFile);
}

function allocationInLock(plan: Plan, lock: Lock | undefined, lockFile: string): Allocation {
  if (!lock) throw new UsageError(`${lockFile}: no lock yet; run \`sidcarve allocate ${plan.file}\` first so that every value is recorded`);
  const a = allocateOrFail(plan, lock, {});
  if (a.added > 0 || a.retiredNow.length > 0 || a.lock.groups.size !== lock.groups.size || a.lock.nodes.size !== lock.nodes.size) {
    throw new UsageError(`${plan.file}: the plan has changed since the lock was written (${a.added} new SIDs, ${a.retiredNow.length} retired values); run \`sidcarve allocate ${plan.file}\` first and review the lock`);
  }
  return a;
}
