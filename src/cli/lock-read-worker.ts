/**
 * Worker thread: the fast read of a lock's bytes (readLockFast: the digest check and the maps),
 * done while the main thread loads the plan. The bytes come in shared memory and are only read
 * here; the lock goes back in parts (lockToParts), its function keys as ranges of those bytes, or
 * null when the fast reader is not sure of the bytes (the main thread then reads them the readable
 * way, for the diagnostics).
 */
import { parentPort, workerData } from "node:worker_threads";
import { readLockFast } from "../alloc/lock-fast.js";
import { lockToParts } from "../alloc/lock-parts.js";

const { buffer, length } = workerData as { buffer: SharedArrayBuffer; length: number };
const lock = readLockFast(Buffer.from(buffer, 0, length));
if (lock === undefined) parentPort?.postMessage(null);
else {
  const { parts, transfer } = lockToParts(lock);
  parentPort?.postMessage(parts, transfer);
}
