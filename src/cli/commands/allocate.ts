/** `sidcarve allocate PLAN`: allocate, write the lock atomically, print the summary. */
import { serializeLock } from "../../alloc/lock.js";
import { allocationSummary } from "../../emit/summary.js";
import type { Io } from "../context.js";
import type { Plan } from "../../plan/model.js";
import { UsageError, readBytesIfExists, sameContent, withBusyMarker, writeAtomic } from "../io.js";
import { allocateOrFail, loadLock, loadPlanFile, lockPathFor } from "../plan-files.js";

export interface AllocateFlags {
  readonly lock?: string;
  readonly allowRenumber?: boolean;
  readonly dryRun?: boolean;
}

export function runAllocate(planFile: string, flags: AllocateFlags, io: Io): number {
  const plan = loadPlanFile(planFile);
  const lockFile = lockPathFor(planFile, flags.lock);
  if (flags.dryRun) return allocateHolding(plan, lockFile, flags, io);
  // Hold <lock>.busy from reading the lock to writing it: a second run at the same time is
  // refused up front instead of overwriting the first run's values.
  return withBusyMarker(lockFile, () => allocateHolding(plan, lockFile, flags, io));
}

function allocateHolding(plan: Plan, lockFile: string, flags: AllocateFlags, io: Io): number {
  const { lock, bytes } = loadLock(plan, lockFile);
  const a = allocateOrFail(plan, lock, { allowRenumber: flags.allowRenumber === true });
  const newText = serializeLock(a.lock);
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
