/** `sidcarve release PLAN (--all | NAME...)`: free retired values so they can be handed out again. */
import { type Lock, releaseRetired, serializeLockBytes } from "../../alloc/lock.js";
import type { Io } from "../context.js";
import { UsageError, readBytesIfExists, sameContent, withBusyMarker, writeAtomic } from "../io.js";
import { loadPlanAndLock, lockPathFor } from "../plan-files.js";

export interface ReleaseFlags {
  readonly lock?: string;
  readonly all?: boolean;
}

export async function runRelease(planFile: string, names: readonly string[], flags: ReleaseFlags, io: Io): Promise<number> {
  if (!flags.all && names.length === 0) throw new UsageError("name what to release (a group path, node, anycast group or SID key), or give --all");
  const lockFile = lockPathFor(planFile, flags.lock);
  const { lock, bytes } = await loadPlanAndLock(planFile, lockFile);
  // hold the lock's busy marker until the lock is written, as allocate does (and, as there, the
  // check before writing covers the moment between reading the lock and taking the marker)
  return withBusyMarker(lockFile, () => releaseHolding(lock, bytes, lockFile, names, flags, io));
}

function releaseHolding(lock: Lock | undefined, bytes: Buffer | undefined, lockFile: string, names: readonly string[], flags: ReleaseFlags, io: Io): number {
  if (!lock) throw new UsageError(`${lockFile}: no lock yet; nothing is retired`);
  const { lock: next, released } = releaseRetired(lock, flags.all ? "all" : names);
  if (released.length === 0) {
    io.out(`nothing released: no retired value ${flags.all ? "" : `held by ${names.map((n) => JSON.stringify(n)).join(", ")}`}\n`);
    return 0;
  }
  for (const r of released) io.out(`released ${r.kind} value 0x${r.value.toString(16)} in ${JSON.stringify(r.space)} (was ${r.was})\n`);
  if (!sameContent(readBytesIfExists(lockFile), bytes)) throw new UsageError(`${lockFile}: the lock changed while this run was working; nothing was written, run again`);
  writeAtomic(lockFile, [serializeLockBytes(next)]);
  io.out(`lock written to ${lockFile}\n`);
  return 0;
}
