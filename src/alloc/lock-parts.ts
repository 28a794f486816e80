/**
 * A lock read by the fast reader in one thread and used in another: the lock in parts that the
 * structured clone carries (maps, bigints, typed arrays), the function keys as ranges of the
 * lock's bytes. The bytes themselves stay where they are (shared memory, read by both threads);
 * the receiving thread puts the ranges back over its own view of them.
 */
import { FunctionStore, LockedFunctions, type StoreParts } from "./lock-functions.js";
import type { Lock, RetiredValue } from "./lock-model.js";

export interface LockParts {
  readonly plan: string;
  readonly layout: string;
  readonly groups: Map<string, bigint>;
  readonly nodes: Map<string, { place: string; value: bigint }>;
  readonly retired: RetiredValue[];
  /** The owners, in the lock's order. */
  readonly owners: string[];
  /** Each owner's entries in the store as from, to; -1, -1 for an owner in `ordinary`. */
  readonly ranges: Int32Array;
  /** Owners the fast reader gave an ordinary Map (an unusual key, a key twice), by their place in `owners`. */
  readonly ordinary: Map<number, Map<string, bigint>>;
  readonly store: StoreParts | undefined;
}

/** The lock in parts, and the buffers that may be moved instead of copied (they are the parts' own). */
export function lockToParts(lock: Lock): { parts: LockParts; transfer: ArrayBuffer[] } {
  const owners = [...lock.functions.keys()];
  const ranges = new Int32Array(owners.length * 2).fill(-1);
  const ordinary = new Map<number, Map<string, bigint>>();
  let store: FunctionStore | undefined;
  owners.forEach((owner, k) => {
    const m = lock.functions.get(owner)!;
    if (m instanceof LockedFunctions && (store === undefined || store === m.store)) {
      store = m.store;
      ranges[2 * k] = m.from;
      ranges[2 * k + 1] = m.to;
    } else ordinary.set(k, new Map(m));
  });
  const s = store?.parts();
  const transfer = s ? [s.keyStart, s.rest, s.end, s.algo, s.hash, s.value, s.ord, s.ordHash].map((a) => a.buffer as ArrayBuffer) : [];
  return {
    parts: { plan: lock.plan, layout: lock.layout, groups: new Map(lock.groups), nodes: new Map(lock.nodes), retired: [...lock.retired], owners, ranges, ordinary, store: s },
    transfer,
  };
}

/** The lock again from its parts, over `bytes`: the same bytes the parts were read from. */
export function lockFromParts(p: LockParts, bytes: Buffer): Lock {
  const store = p.store ? FunctionStore.fromParts(bytes, p.store) : undefined;
  const functions = new Map<string, Map<string, bigint>>();
  p.owners.forEach((owner, k) => {
    const from = p.ranges[2 * k]!;
    functions.set(owner, from >= 0 && store ? new LockedFunctions(store, from, p.ranges[2 * k + 1]!) : p.ordinary.get(k)!);
  });
  return { plan: p.plan, layout: p.layout, groups: p.groups, nodes: p.nodes, functions, retired: p.retired };
}
