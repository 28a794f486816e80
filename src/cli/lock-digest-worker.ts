/**
 * Worker thread: the compact digest of a lock's bytes (compactDigest), computed while the main
 * thread loads the plan. The bytes come in shared memory and are only read here.
 */
import { parentPort, workerData } from "node:worker_threads";
import { compactDigest } from "../alloc/lock-fast.js";

const { buffer, length } = workerData as { buffer: SharedArrayBuffer; length: number };
parentPort?.postMessage(compactDigest(Buffer.from(buffer, 0, length)) ?? null);
