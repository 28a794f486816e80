/**
 * The lock: every value the allocator has handed out, kept beside the plan and committed with it,
 * so that re-running never moves an existing SID. Serialised as sorted JSON with a digest that
 * exposes hand edits, truncation and a lock that belongs to another plan.
 */
import { createHash } from "node:crypto";
import type { Diagnostic } from "../plan/diagnostic.js";
import { readLockFast } from "./lock-fast.js";
import { serializeLockBytes, sortedRetired } from "./lock-write.js";
import { LOCK_SCHEMA_ID, type Lock, type RetiredValue, hexDigit, smallBigInt } from "./lock-model.js";

export { LOCK_SCHEMA_ID, type Lock, type RetiredValue, hexDigit, smallBigInt } from "./lock-model.js";
export { serializeLockBytes } from "./lock-write.js";

export function emptyLock(plan: string, layout: string): Lock {
  return { plan, layout, groups: new Map(), nodes: new Map(), functions: new Map(), retired: [] };
}

const hex = (v: bigint) => "0x" + v.toString(16);

/** The lock as the plain object its text holds (without the digest): the readable form of serializeLock. */
export function lockBody(lock: Lock): Record<string, unknown> {
  const sortObj = <T>(m: ReadonlyMap<string, T>, f: (v: T) => unknown) =>
    Object.fromEntries([...m.keys()].sort().map((k) => [k, f(m.get(k)!)]));
  return {
    schema: LOCK_SCHEMA_ID,
    plan: lock.plan,
    layout: lock.layout,
    groups: sortObj(lock.groups, hex),
    nodes: sortObj(lock.nodes, (n) => ({ place: n.place, value: hex(n.value) })),
    functions: sortObj(lock.functions, (m) => sortObj(m, hex)),
    retired: sortedRetired(lock.retired).map((r) => ({ kind: r.kind, space: r.space, value: hex(r.value), was: r.was })),
  };
}

function digestOf(b: Record<string, unknown>): string {
  return "sha256:" + createHash("sha256").update(JSON.stringify(b)).digest("hex");
}

/**
 * Deterministic text of a lock (same lock, same bytes), ending in a newline: exactly
 * `JSON.stringify({ ...lockBody(lock), digest }, null, 2) + "\n"`, where the digest is the SHA-256 of
 * `JSON.stringify(lockBody(lock))`. serializeLockBytes (lock-write.ts) writes its bytes directly,
 * the two forms side by side, because a lock of a million SIDs would otherwise be turned into
 * objects and stringified twice (the readable form is lockBody; tests compare the two on random locks).
 */
export function serializeLock(lock: Lock): string {
  return serializeLockBytes(lock).toString("utf8");
}

export type LockRead = { ok: true; lock: Lock } | { ok: false; diagnostics: Diagnostic[] };

/**
 * Read a lock, from its text or its bytes (UTF-8). Problems — not JSON, truncated, wrong schema, a
 * digest that does not match (hand-edited), or a lock of another plan — are diagnostics; the
 * caller must then write nothing. An intact lock is read by the fast reader (lock-fast.ts);
 * anything it is not sure of is read by parseLockReadable, which is the reference. `fast`: the
 * fast reader's answer for these same bytes when it was found elsewhere (the CLI reads a large
 * lock in a worker thread while the plan loads).
 */
export function parseLock(input: string | Uint8Array, file: string, planName: string, fast?: { readonly lock: Lock | undefined }): LockRead {
  const lock = fast ? fast.lock : readLockFast(typeof input === "string" ? Buffer.from(input, "utf8") : input);
  if (lock !== undefined && lock.plan === planName) return { ok: true, lock };
  const text = typeof input === "string" ? input : Buffer.from(input.buffer, input.byteOffset, input.byteLength).toString("utf8");
  return parseLockReadable(text, file, planName);
}

/** The readable lock reader: JSON.parse, then JSON.stringify again for the digest. */
export function parseLockReadable(text: string, file: string, planName: string): LockRead {
  const fail = (code: string, message: string) => ({ ok: false as const, diagnostics: [{ code, message, location: { file } }] });
  let data: any;
  try {
    data = JSON.parse(text);
  } catch (e) {
    return fail("lock/unreadable", `the lock file is not complete JSON (${(e as Error).message}); it may be truncated. Restore it from version control; nothing was written`);
  }
  if (data === null || typeof data !== "object" || data.schema !== LOCK_SCHEMA_ID) {
    return fail("lock/schema", `the file is not a sidcarve lock (expected "schema": "${LOCK_SCHEMA_ID}"); nothing was written`);
  }
  const { digest, ...rest } = data;
  try {
    if (digest !== digestOf(rest)) {
      return fail("lock/digest", "the lock file does not match its digest: it was edited by hand or damaged. Restore it from version control (or delete it to allocate afresh, which renumbers everything); nothing was written");
    }
    if (data.plan !== planName) {
      return fail("lock/other-plan", `the lock belongs to plan ${JSON.stringify(data.plan)}, not to ${JSON.stringify(planName)}; point --lock at the right file; nothing was written`);
    }
    const groups = new Map(Object.entries(data.groups ?? {}).map(([k, v]) => [k, lockValue(v)]));
    const nodes = new Map(Object.entries(data.nodes ?? {}).map(([k, v]: [string, any]) => [k, { place: String(v.place), value: lockValue(v.value) }]));
    const functions = new Map<string, Map<string, bigint>>();
    for (const owner of Object.keys(data.functions ?? {})) {
      const fns = data.functions[owner];
      if (fns === null || typeof fns !== "object") throw new Error(`bad functions of ${JSON.stringify(owner)}`);
      const m = new Map<string, bigint>();
      for (const key of Object.keys(fns)) m.set(key, lockValue(fns[key]));
      functions.set(owner, m);
    }
    const retired: RetiredValue[] = ((data.retired ?? []) as any[]).map((r) => {
      if (!["group", "node", "function"].includes(r.kind)) throw new Error(`bad retired kind ${JSON.stringify(r.kind)}`);
      return { kind: r.kind, space: String(r.space), value: lockValue(r.value), was: String(r.was) };
    });
    return { ok: true, lock: { plan: data.plan, layout: String(data.layout), groups, nodes, functions, retired } };
  } catch (e) {
    return fail("lock/schema", `the lock file is inconsistent (${(e as Error).message}); restore it from version control; nothing was written`);
  }
}

/** Bigints of the small values a lock mostly holds, made once (bigints are values: sharing them changes nothing). */
/**
 * A lock value: "0x" and lower-case hex digits, as serializeLock writes it. A loop over the
 * characters instead of a regular expression and BigInt(text) per value: a large lock holds a
 * million of them.
 */
export function lockValue(s: unknown): bigint {
  if (typeof s !== "string" || s.length < 3 || s.charCodeAt(0) !== 0x30 || s.charCodeAt(1) !== 0x78) throw new Error(`bad value ${JSON.stringify(s)}`);
  let n = 0;
  for (let i = 2; i < s.length; i++) {
    const d = hexDigit(s.charCodeAt(i));
    if (d < 0) throw new Error(`bad value ${JSON.stringify(s)}`);
    n = n * 16 + d;
  }
  if (s.length > 2 + 13) return BigInt(s); // beyond 2^52 a double would round; the digits were checked above
  return smallBigInt(n);
}

/**
 * Return retired values to the free pool: all of them, or those whose former holder is named
 * (a group path, node or anycast name, or a SID key). Returns the new lock and what was freed.
 */
export function releaseRetired(lock: Lock, names: readonly string[] | "all"): { lock: Lock; released: RetiredValue[] } {
  const hit = (r: RetiredValue) => names === "all" || names.includes(r.was) || names.includes(r.was.replace(/^anycast:/, ""));
  const released = lock.retired.filter(hit);
  return { lock: { ...lock, retired: lock.retired.filter((r) => !hit(r)) }, released };
}
