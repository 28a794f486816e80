/** `sidcarve allocate PLAN`: allocate, write the lock atomically, print the summary. */
import { type Lock, serializeLockBytes } from "../../alloc/lock.js";
import { allocationSummary } from "../../emit/summary.js";
import type { Io } from "../context.js";
import type { Plan } from "../../plan/model.js";
import { UsageError, readBytesIfExists, sameContent, withBusyMarker, writeAtomic } from "../io.js";
import { allocateOrFail, loadPlanAndLock, lockPathFor } from "../plan-files.js";

export interface AllocateFlags {
  readonly lock?: string;
  readonly allowRenumber?: boolean;
  readonly dryRun?: boolean;
}

export async function runAllocate(planFile: string, flags: AllocateFlags, io: Io): Promise<number> {
  const lockFile = lockPathFor(planFile, flags.lock);
  // the lock is read while the plan loads (a large one in a worker thread)
  const { plan, lock, bytes } = await loadPlanAndLock(planFile, lockFile);
  if (flags.dryRun) return allocateHolding(plan, lock, bytes, lockFile, flags, io);
  // Hold <lock>.busy until the lock is written: a second run at the same time is refused up front
  // instead of overwriting the first run's values. The lock was read just before the marker was
  // taken; the check before writing (the lock's bytes are still those read) covers that moment.
  return withBusyMarker(lockFile, () => allocateHolding(plan, lock, bytes, lockFile, flags, io));
}

function allocateHolding(plan: Plan, lock: Lock | undefined, bytes: Buffer | undefined, lockFile: string, flags: AllocateFlags, io: Io): number {
  const a = allocateOrFail(plan, lock, { allowRenumber: flags.allowRenumber === true });
  const newText = serializeLockBytes(a.lock);
  const sids = a.packed.count;
  io.out(`plan ${plan.name}: ${a.packed.nodeNames.length} nodes, ${sids} SIDs (${a.added} new), ${a.retiredNow.length} values retired\n`);
  for (const m of a.moves) io.out(`renumbered ${m.what}: ${m.from} -> ${m.to} (${m.reason})\n`);
  io.out(allocationSummary(a));
  if (flags.dryRun) {
    io.out(`dry run: ${lockFile} not written\n`);
    return 0;
  }
  if (sameContent(newText, bytes)) {
    io.out(`lock ${lockFile} unchanged\n`);
    return 0;
  }
  // Another run may have written the lock since we read it: refuse rather than lose its values.
  if (!sameContent(readBytesIfExists(lockFile), bytes)) {
    throw new UsageError(`${lockFile}: the lock changed while this run was working (another sidcarve run?); nothing was written, run again`);
  }
  writeAtomic(lockFile, [newText]);
  io.out(`lock written to ${lockFile}\n`);
  return 0;
}
