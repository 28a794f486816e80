/**
 * The allocator: hands out level values, node values and function values from a plan and its
 * lock, carves every locator and SID exactly as the block's structure says, and returns the new
 * lock. Pinned values are kept; values in the lock never move unless renumbering is allowed.
 */
import { Prefix } from "../net/prefix.js";
import { type Addr, toWords } from "../net/uint128.js";
import { type BehaviorName, type Flavor, codepointOf, normalizeFlavors } from "../sid/behaviors.js";
import type { PackedSidTable } from "../sid/packed.js";
import type { LocatorEntry, SidContext, SidStructure, SidTable } from "../sid/table.js";
import { type Diagnostic, quote } from "../plan/diagnostic.js";
import type { Block, Layout, Level, Plan, PlanNode, PoolKind, ValueRange } from "../plan/model.js";
import { POOL_KINDS } from "../plan/model.js";
import { inRanges, levelCapacity, rangeSize } from "../plan/normalize.js";
import { LockedFunctions, countsByAlgorithm, keyHash } from "./lock-functions.js";
import { type Lock, type RetiredValue, emptyLock } from "./lock.js";
import { bitOrder, nthValue } from "./order.js";
import { type RowSource, type SidRow, SidRowSink, setSidWords } from "./sid-rows.js";
import { TakenValues } from "./taken.js";

/** One value that would change, for the renumbering refusal and for the summary. */
export interface Move {
  readonly what: string;
  readonly from: string;
  readonly to: string;
  readonly reason: string;
}

export interface UsageRow {
  readonly name: string;
  readonly used: bigint;
  readonly capacity: bigint;
  /** Where the fullest part is (e.g. the site with most routers). */
  readonly fullest?: string;
  readonly fullestUsed?: bigint;
}

export interface Allocation {
  readonly plan: Plan;
  /** The SIDs as objects: nodes sorted by name, each node's SIDs by address (made from `packed` on first use). */
  readonly table: SidTable;
  /** The same SIDs in columns, as the allocator wrote them (emitters and the linter read these). */
  readonly packed: PackedSidTable;
  readonly lock: Lock;
  readonly groupValues: ReadonlyMap<string, bigint>;
  /** node or anycast name -> hierarchical node value (without algorithm bits) */
  readonly nodeValues: ReadonlyMap<string, bigint>;
  readonly levelUsage: readonly UsageRow[];
  readonly poolUsage: readonly UsageRow[];
  readonly moves: readonly Move[];
  readonly retiredNow: readonly RetiredValue[];
  readonly added: number;
}

export interface AllocateOptions {
  /** Accept moving locked values (each move is reported and the old value retired). */
  readonly allowRenumber?: boolean;
}

export type AllocateResult =
  | { ok: true; allocation: Allocation }
  | { ok: false; diagnostics: Diagnostic[]; moves: Move[] };

/** Fingerprint of what decides every locator: level widths and each block's prefix and structure. */
export function layoutFingerprint(plan: Plan): string {
  const lv = plan.levels.map((l) => `${l.name}:${l.bits}`).join(",");
  const bl = plan.blocks
    .map((b) => {
      const L = b.layout;
      const s = L.kind === "classic" ? `classic:${L.nodeBits}/${L.functionBits}/${L.argumentBits}` : `${L.flavor}:${L.csidBits}/${L.nodeBits}/${L.functionBits}`;
      return `${b.name}=${b.prefix.format()}:${s}:a${b.algorithms.join("+")}:${b.algorithmBits}`;
    })
    .sort()
    .join(",");
  return `levels=${lv};blocks=${bl}`;
}

const hex = (v: bigint) => "0x" + v.toString(16);

/** Allocate a plan against its lock (or none). Pure: the caller reads and writes files. */
export function allocate(plan: Plan, previous: Lock | undefined, options: AllocateOptions = {}): AllocateResult {
  const diags: Diagnostic[] = [];
  const moves: Move[] = [];
  const allow = options.allowRenumber === true;
  const layout = layoutFingerprint(plan);
  let lock = previous ?? emptyLock(plan.name, layout);
  const retiredNow: RetiredValue[] = [];
  if (previous && previous.layout !== layout) {
    moves.push({ what: "every locator", from: previous.layout, to: layout, reason: "the level widths or a block's prefix or structure changed" });
    if (!allow) return { ok: false, diagnostics: [], moves };
    // Renumber from scratch but keep the old values retired? They live in another layout, so
    // they cannot collide; start a clean lock.
    lock = emptyLock(plan.name, layout);
  }
  const retired = [...lock.retired];
  // Retired values by kind and space, indexed once (callers copy the set before adding to it).
  const retiredBySpace = new Map<string, Set<bigint>>();
  for (const r of retired) {
    const k = `${r.kind}|${r.space}`;
    let set = retiredBySpace.get(k);
    if (!set) retiredBySpace.set(k, (set = new Set()));
    set.add(r.value);
  }
  const noRetired: ReadonlySet<bigint> = new Set();
  const retiredIn = (kind: RetiredValue["kind"], space: string): ReadonlySet<bigint> => retiredBySpace.get(`${kind}|${space}`) ?? noRetired;

  // ---- level values for groups, parent by parent in file order
  const groupValues = new Map<string, bigint>();
  const byParent = new Map<string, typeof plan.groups[number][]>();
  for (const g of plan.groups) {
    const k = g.parent ?? "";
    if (!byParent.has(k)) byParent.set(k, []);
    byParent.get(k)!.push(g);
  }
  const groupPath = (path: string): (string | number)[] => ["groups", ...path.split("/").flatMap((p, i) => (i === 0 ? [p] : ["groups", p]))];
  const allLevelBits = plan.levels.reduce((s, l) => s + l.bits, 0);
  /**
   * A new group value is usable only when its nodes can get node C-SIDs: in every two-C-SID
   * compressed block that may serve the group, the node fields under the value (for each of the
   * block's algorithms) must meet the GIB (RFC 9800 §5). Otherwise a region could take, say,
   * 0xc in front of a LIB at 0xc000 and every router in it would fail with "level full".
   */
  const groupFits = (path: string, parent: string, depth: number, v: bigint): boolean => {
    let prefix = 0n;
    if (parent !== "") parent.split("/").forEach((_, i, parts) => (prefix = (prefix << BigInt(plan.levels[i]!.bits)) | (groupValues.get(parts.slice(0, i + 1).join("/")) ?? 0n)));
    const below = BigInt(allLevelBits - plan.levels.slice(0, depth + 1).reduce((s, l) => s + l.bits, 0));
    const lo = ((prefix << BigInt(plan.levels[depth]!.bits)) | v) << below;
    const hi = lo + (1n << below) - 1n;
    for (const b of plan.blocks) {
      const L = b.layout;
      if (L.kind !== "compressed" || !L.twoCsid) continue;
      if (b.groups.length > 0 && !b.groups.some((g) => g === path || path.startsWith(g + "/") || g.startsWith(path + "/"))) continue;
      for (let i = 0; i < b.algorithms.length; i++) {
        const a = BigInt(i) << BigInt(allLevelBits);
        if (!L.gib.some((r) => r.first <= (a | hi) && r.last >= (a | lo))) return false;
      }
    }
    return true;
  };
  for (const [parent, kids] of byParent) {
    const level = plan.levels[kids[0]!.depth]!;
    const items = kids.map((g) => ({ id: g.path, pinned: g.pinned, locked: lock.groups.get(g.path), at: groupPath(g.path), label: `group ${g.path}` }));
    // Values of groups that leave the plan in this run are retired below: no new group may take them now.
    const leaving = new Set<bigint>();
    for (const [path, v] of lock.groups) if ((path.includes("/") ? path.slice(0, path.lastIndexOf("/")) : "") === parent && !plan.groups.some((g) => g.path === path)) leaving.add(v);
    // Locked values stay as they are (a value that cannot hold nodes shows up when a node is added).
    const fits = (id: string, v: bigint) => lock.groups.get(id) === v || groupFits(id, parent, kids[0]!.depth, v);
    const values = assignLevel(level, items, retiredIn("group", parent), fits, allow, moves, diags, plan.locate, leaving);
    for (const [id, v] of values) groupValues.set(id, v);
    // retire groups of this parent that left the plan
  }
  for (const [path, v] of lock.groups) {
    if (!plan.groups.some((g) => g.path === path)) retiredNow.push({ kind: "group", space: path.includes("/") ? path.slice(0, path.lastIndexOf("/")) : "", value: v, was: path });
  }
  for (const g of plan.groups) {
    const old = lock.groups.get(g.path);
    const now = groupValues.get(g.path);
    if (old !== undefined && now !== undefined && old !== now) retiredNow.push({ kind: "group", space: g.parent ?? "", value: old, was: g.path });
  }

  // ---- prefix of levels above the last, per place
  // made once per place (every node asks, twice): group values are all known by now
  const placeValues = new Map<string, bigint>();
  const placeValue = (place: string): bigint => {
    if (plan.levels.length === 1) return 0n;
    const known = placeValues.get(place);
    if (known !== undefined) return known;
    let v = 0n;
    const parts = place.split("/");
    for (let i = 0; i < parts.length; i++) {
      const path = parts.slice(0, i + 1).join("/");
      v = (v << BigInt(plan.levels[i]!.bits)) | (groupValues.get(path) ?? 0n);
    }
    placeValues.set(place, v);
    return v;
  };
  const last = plan.levels[plan.levels.length - 1]!;
  const levelBits = plan.levels.reduce((s, l) => s + l.bits, 0);

  // which block serves a node for an algorithm
  const blockCache = new Map<string, Block | undefined>();
  const blockFor = (place: string, algo: number): Block | undefined => {
    const k = `${algo}|${place}`;
    if (blockCache.has(k)) return blockCache.get(k);
    const b = plan.blocks.find((b) => b.algorithms.includes(algo) && (b.groups.length === 0 || b.groups.some((g) => place === g || place.startsWith(g + "/"))));
    blockCache.set(k, b);
    return b;
  };
  const nodeField = (b: Block, algo: number, hv: bigint) => (BigInt(b.algorithms.indexOf(algo)) << BigInt(levelBits)) | hv;
  /** A node value is usable when, in every compressed block it lands in, its C-SID is not 0 and lies in the GIB. */
  const nodeValueFits = (place: string, algos: readonly number[], leaf: bigint): boolean => {
    const hv = (placeValue(place) << BigInt(last.bits)) | leaf;
    for (const a of algos) {
      const b = blockFor(place, a);
      if (!b || b.layout.kind !== "compressed" || !b.layout.twoCsid) continue;
      const f = nodeField(b, a, hv);
      if (f === 0n || !inRanges(f, b.layout.gib)) return false;
    }
    return true;
  };

  // ---- node (and anycast) values, place by place
  const nodeValues = new Map<string, bigint>();
  const entities = [
    ...plan.nodes.map((n) => ({ id: n.name, place: n.place, pinned: n.pinned, algos: n.algorithms, at: ["nodes", n.index] as (string | number)[], label: `node ${n.name}` })),
    ...plan.anycast.map((a, i) => ({ id: `anycast:${a.name}`, place: a.place, pinned: a.pinned, algos: a.algorithms, at: ["anycast", i] as (string | number)[], label: `anycast group ${a.name}` })),
  ];
  const byPlace = new Map<string, typeof entities>();
  for (const e of entities) {
    if (!byPlace.has(e.place)) byPlace.set(e.place, []);
    byPlace.get(e.place)!.push(e);
  }
  const placeOf = new Map(entities.map((e) => [e.id, e.place]));
  // locked nodes by their locked place, so that each place looks only at its own
  const lockedAt = new Map<string, [string, bigint][]>();
  for (const [id, l] of lock.nodes) {
    const list = lockedAt.get(l.place);
    if (list) list.push([id, l.value]);
    else lockedAt.set(l.place, [[id, l.value]]);
  }
  for (const [place, list] of byPlace) {
    // Values of nodes that leave this place in this run (removed or moved) are retired below: no
    // new node may take them now.
    const leaving = new Set<bigint>();
    for (const [id, v] of lockedAt.get(place) ?? []) if (placeOf.get(id) !== place) leaving.add(v);
    const items = list.map((e) => {
      const l = lock.nodes.get(e.id);
      let locked = l?.value;
      if (l && l.place !== place) {
        moves.push({ what: e.label, from: `${l.place} value ${hex(l.value)}`, to: place, reason: `it moved from ${quote(l.place)} to ${quote(place)}` });
        retiredNow.push({ kind: "node", space: l.place, value: l.value, was: e.id });
        locked = undefined;
        if (!allow) return { ...e, locked: undefined, skip: true };
      }
      return { ...e, locked, skip: false };
    });
    const algosOf = new Map(items.map((i) => [i.id, i.algos]));
    const values = assignLevel(
      last,
      items.filter((i) => !i.skip).map((i) => ({ id: i.id, pinned: i.pinned, locked: i.locked, at: i.at, label: i.label })),
      retiredIn("node", place),
      (id, v) => nodeValueFits(place, algosOf.get(id) ?? [], v),
      allow,
      moves,
      diags,
      plan.locate,
      leaving,
    );
    for (const [id, v] of values) {
      const old = lock.nodes.get(id);
      if (old && old.place === place && old.value !== v) retiredNow.push({ kind: "node", space: place, value: old.value, was: id });
      nodeValues.set(id, (placeValue(place) << BigInt(last.bits)) | v);
    }
  }
  const leafValues = new Map<string, { place: string; value: bigint }>();
  for (const e of entities) {
    const v = nodeValues.get(e.id);
    if (v !== undefined) leafValues.set(e.id, { place: e.place, value: v & ((1n << BigInt(last.bits)) - 1n) });
  }
  for (const [id, l] of lock.nodes) {
    if (!placeOf.has(id)) retiredNow.push({ kind: "node", space: l.place, value: l.value, was: id });
  }
  if (diags.length > 0 || (moves.length > 0 && !allow)) return { ok: false, diagnostics: diags, moves };

  // ---- SIDs, locator by locator
  const nodeByName = new Map(plan.nodes.map((n) => [n.name, n]));
  const functionsOut = new Map<string, ReadonlyMap<string, bigint>>();
  const poolMax = new Map<string, { used: bigint; cap: bigint; where: string }>();
  /** `block/pool` names of each block's pools (in POOL_KINDS order), and a counter per pool. */
  const poolNames: Record<string, string[]> = Object.create(null);
  const usedScratch: number[] = POOL_KINDS.map(() => 0);
  let added = 0;

  const { byNode: specsFor, all: allSpecs } = buildSpecs(plan, nodeByName, diags);
  const sink = new SidRowSink(plan.name, allSpecs, (src, algo) => lockKey(src as SidSpec, algo));
  // A service on an algorithm its node does not run would silently get no SID: refuse it.
  for (const n of plan.nodes) {
    const list = specsFor.get(n.name) ?? NO_SPECS;
    for (let k = 0; k < list.length; k++) {
      const sp = list[k]!;
      if (sp.algos === undefined) continue;
      for (let j = 0; j < sp.algos.length; j++) {
        const a = sp.algos[j]!;
        if (n.algorithms.includes(a)) continue;
        diags.push({ code: "alloc/algorithm", message: `${sp.behavior} ${quote(sp.key.split("|").slice(1).filter(Boolean).join(" "))} on ${n.name} uses algorithm ${a}, which ${n.name} does not run (it runs ${n.algorithms.join(", ")}); add the algorithm to the node or move the service`, location: plan.locate(sp.at) });
      }
    }
  }
  if (diags.length > 0) return { ok: false, diagnostics: diags, moves };

  // reused from one locator to the next (see TakenValues): taken values, the locator's specs,
  // their locked values and the values chosen
  const taken = new TakenValues();
  const specScratch: SidSpec[] = [];
  const lockedScratch: (bigint | undefined)[] = [];
  const chosenScratch: (bigint | undefined)[] = [];
  /** Allocate one owner's SIDs into rows (`keep`: rows of their own, for an anycast group shared by its members). */
  const allocOwner = (owner: string, place: string, algos: readonly number[], anycastName: string | undefined, keep: boolean): { locators: LocatorEntry[]; rows: SidRow[] } => {
    const locators: LocatorEntry[] = [];
    const rows: SidRow[] = [];
    const hv = nodeValues.get(owner)!;
    const lockedFns = lock.functions.get(owner) ?? new Map<string, bigint>();
    // the fast reader's functions answer a spec's key and algorithm without a key string
    const fast = lockedFns instanceof LockedFunctions ? lockedFns : undefined;
    // the owner's functions for the new lock, in SID order (each spec and algorithm; the keys
    // are made only when needed); when they are the locked ones to the letter (a run against an
    // up-to-date lock), the locked map itself is kept
    const outSpecs: SidSpec[] = [];
    const outAlgos: number[] = [];
    const outValues: bigint[] = [];
    let sameAsLocked = true;
    let lockedPerAlgo: Map<number, number> | undefined;
    for (let ai = 0; ai < algos.length; ai++) {
      const algo = algos[ai]!;
      const b = blockFor(place, algo);
      if (!b) {
        diags.push({ code: "alloc/no-block", message: `no block serves algorithm ${algo} for ${owner.replace("anycast:", "anycast group ")} in ${quote(place)}; add the algorithm to a block's algorithms or remove it from the node`, location: plan.locate(owner.startsWith("anycast:") ? ["anycast"] : ["nodes", nodeByName.get(owner)?.index ?? 0]) });
        continue;
      }
      const L = b.layout;
      const field = nodeField(b, algo, hv);
      const locLen = L.blockBits + L.nodeBits;
      const locator = new Prefix(b.prefix.first | (field << BigInt(128 - locLen)), locLen);
      const locEntry: LocatorEntry = { prefix: locator, algorithm: algo, block: b.name, anycast: anycastName ?? "" };
      locators.push(locEntry);
      // (the locator's address has no host bits: it is its first address)
      const carve: Carve = { L, locator: locEntry, first: locator.addr, words: toWords(locator.addr), fnShift: 128 - L.blockBits - L.nodeBits - L.functionBits };
      const firstEnd = endSpecs(plan, algo)[0]?.key;
      // Two-C-SID layouts: the first End SID is the node's global C-SID alone (no local C-SID).
      const specs = specScratch;
      specs.length = 0;
      const own = anycastName ? endSpecs(plan, algo) : (specsFor.get(owner) ?? NO_SPECS);
      const globalOnly = L.kind === "compressed" && L.twoCsid;
      for (let k = 0; k < own.length; k++) {
        const s = own[k]!;
        if (s.algos !== undefined && !s.algos.includes(algo)) continue;
        specs.push(globalOnly && s.key === firstEnd ? s.withoutFunction() : s);
      }
      const space = `${owner}|${algo}`;
      taken.reset(L.functionBits, retiredIn("function", space));
      // each spec's lock key, made when first asked for (made once per spec and algorithm)
      let keys: string[] | undefined;
      const keyOf = (si: number): string => (keys ??= specs.map((s) => lockKey(s, algo)))[si]!;
      // Values of this locator's SIDs that leave the plan in this run are retired below: keep them
      // out of pass 2 too, or a new SID would take a value the lock also lists as retired.
      // When every locked key of this algorithm is one of this locator's keys, none leaves: count
      // instead of building a set (the usual case, and a million SIDs deep).
      // each spec's locked value, looked up once
      const lockedValues = lockedScratch;
      lockedValues.length = 0;
      let hits = 0;
      for (let si = 0; si < specs.length; si++) {
        const sp = specs[si]!;
        const v = fast ? fast.lookup(algo, sp.key, (sp.keyHash ??= keyHash(sp.key))) : lockedFns.get(keyOf(si));
        lockedValues.push(v);
        if (v !== undefined) hits++;
      }
      if (hits < ((lockedPerAlgo ??= countsByAlgorithm(lockedFns)).get(algo) ?? 0)) {
        const specKeys = new Set(specs.map((_, si) => keyOf(si)));
        const algoPrefix = `${algo}|`;
        for (const [k, v] of lockedFns) if (!specKeys.has(k) && k.startsWith(algoPrefix)) taken.add(v);
      }
      const pools = cachedPools(plan, L);
      const fnMax = (1n << BigInt(L.functionBits)) - 1n;
      const fits = (v: bigint) => {
        if (v > fnMax || inRanges(v, plan.reservedFunctions)) return false;
        if (L.kind === "classic" && v === 0n && !plan.functionPools.end) return false;
        if (L.kind === "compressed" && !L.twoCsid) {
          const csid = (field << BigInt(L.functionBits)) | v;
          return csid !== 0n && inRanges(csid, L.gib);
        }
        return true;
      };
      /** The smallest value >= v that range-based limits (reserved functions, the GIB of a one-C-SID layout) do not exclude. */
      const skipUnfit = (v: bigint): bigint => {
        for (const r of plan.reservedFunctions) if (v >= r.first && v <= r.last) return r.last + 1n;
        if (L.kind === "compressed" && !L.twoCsid) {
          const base = field << BigInt(L.functionBits);
          const csid = base | v;
          if (!inRanges(csid, L.gib)) {
            let next: bigint | undefined;
            for (const g of L.gib) if (g.first > csid && (next === undefined || g.first < next)) next = g.first;
            return next === undefined || next - base > fnMax ? fnMax + 1n : next - base;
          }
        }
        return v;
      };
      // pass 1: pins and locked values. Each spec's value by its place in `specs` (a spec's key is
      // its own on a locator: the plan refuses repeated names, buildSpecs parallel links)
      const chosen = chosenScratch;
      chosen.length = 0;
      for (let si = 0; si < specs.length; si++) chosen.push(undefined);
      for (let si = 0; si < specs.length; si++) {
        const s = specs[si]!;
        if (s.noFunction) continue;
        const locked = lockedValues[si];
        if (s.pinned !== undefined) {
          if (s.pinned > fnMax) {
            diags.push({ code: "alloc/pin", message: `pinned function ${hex(s.pinned)} does not fit the ${L.functionBits}-bit function field of block ${quote(b.name)}`, location: plan.locate(s.at) });
            continue;
          }
          const pinProblem = pinnedFunctionProblem(plan, L, field, s.pinned);
          if (pinProblem) {
            diags.push({ code: "alloc/pin", message: `pinned function ${hex(s.pinned)} on ${owner}: ${pinProblem}`, location: plan.locate(s.at) });
            continue;
          }
          if (locked !== undefined && locked !== s.pinned) {
            moves.push({ what: `${owner} ${s.behavior} ${s.key}`, from: hex(locked), to: hex(s.pinned), reason: "its pinned function value changed" });
            if (!allow) continue;
            retiredNow.push({ kind: "function", space, value: locked, was: keyOf(si) });
            taken.add(locked);
          }
          if (taken.has(s.pinned)) {
            diags.push({ code: "alloc/pin-conflict", message: `function ${hex(s.pinned)} pinned for ${s.behavior} ${quote(s.key)} on ${owner} is already used or retired on that locator`, location: plan.locate(s.at) });
            continue;
          }
          chosen[si] = s.pinned;
          taken.add(s.pinned);
        } else if (locked !== undefined) {
          const pool = pools[s.pool];
          if (!inRanges(locked, pool) || !fits(locked)) {
            moves.push({ what: `${owner} ${s.behavior} ${s.key}`, from: hex(locked), to: "(a new value)", reason: `${hex(locked)} is no longer in the ${s.pool} pool` });
            if (!allow) continue;
            retiredNow.push({ kind: "function", space, value: locked, was: keyOf(si) });
            taken.add(locked);
            continue;
          }
          if (taken.has(locked)) {
            diags.push({ code: "alloc/lock-conflict", message: `the lock gives function ${hex(locked)} twice on ${owner} (algorithm ${algo}); restore the lock from version control`, location: { file: plan.file } });
            continue;
          }
          chosen[si] = locked;
          taken.add(locked);
        }
      }
      // pass 2: new values, first free in each pool
      const cursors = new Map<PoolKind, { range: number; next: bigint }>();
      for (let si = 0; si < specs.length; si++) {
        const s = specs[si]!;
        if (s.noFunction || chosen[si] !== undefined) continue;
        const pool = pools[s.pool];
        const cur = cursors.get(s.pool) ?? { range: 0, next: pool[0]?.first ?? 0n };
        let found: bigint | undefined;
        while (cur.range < pool.length) {
          const r = pool[cur.range]!;
          if (cur.next < r.first) cur.next = r.first;
          if (cur.next > r.last) {
            cur.range++;
            continue;
          }
          const v = cur.next;
          if (v > fnMax) {
            cur.range = pool.length;
            break;
          }
          if (!fits(v)) {
            // jump over whole reserved or out-of-pool ranges instead of stepping value by value
            const j = skipUnfit(v);
            cur.next = j > v ? j : v + 1n;
            continue;
          }
          cur.next = v + 1n;
          if (!taken.has(v)) {
            found = v;
            break;
          }
        }
        cursors.set(s.pool, cur);
        if (found === undefined) {
          diags.push({ code: "alloc/pool-full", message: `the ${s.pool} function pool of block ${quote(b.name)} (${rangeSize(pool)} values) is exhausted on ${owner} (algorithm ${algo}); widen the pool or the function field`, location: plan.locate(s.at) });
          continue;
        }
        chosen[si] = found;
        taken.add(found);
        added++;
      }
      // pool usage: how many chosen values fall in each pool (pools the plan names may overlap),
      // counted as numbers, in POOL_KINDS order
      const used = usedScratch.fill(0);
      const disjoint = poolsDisjoint(pools);
      for (let si = 0; si < specs.length; si++) {
        const v = chosen[si];
        if (v === undefined) continue;
        // the usual case: the value is in its own spec's pool, and no other pool can hold it
        if (disjoint && inRanges(v, pools[specs[si]!.pool])) {
          used[POOL_INDEX[specs[si]!.pool]]!++;
          continue;
        }
        for (let k = 0; k < POOL_KINDS.length; k++) {
          if (!inRanges(v, pools[POOL_KINDS[k]!])) continue;
          used[k]!++;
          if (disjoint) break; // no other pool can hold it
        }
      }
      const names = (poolNames[b.name] ??= POOL_KINDS.map((kind) => `${b.name}/${kind}`));
      for (let k = 0; k < POOL_KINDS.length; k++) {
        const prev = poolMax.get(names[k]!);
        const u = BigInt(used[k]!);
        if (!prev || u > prev.used) poolMax.set(names[k]!, { used: u, cap: prev?.cap ?? rangeSize(pools[POOL_KINDS[k]!]), where: owner });
      }
      // SIDs
      for (let si = 0; si < specs.length; si++) {
        const s = specs[si]!;
        const fn = s.noFunction ? 0n : chosen[si];
        if (fn === undefined) continue;
        if (!s.noFunction) {
          outSpecs.push(s);
          outAlgos.push(algo);
          outValues.push(fn);
          if (sameAsLocked && lockedValues[si] !== fn) sameAsLocked = false;
        }
        const r = sink.row(keep);
        fillRow(r, carve, algo, s, fn);
        rows.push(r);
      }
    }
    let outFns: ReadonlyMap<string, bigint>;
    if (sameAsLocked && outSpecs.length === lockedFns.size) outFns = lockedFns;
    else {
      const m = new Map<string, bigint>();
      for (let i = 0; i < outSpecs.length; i++) m.set(lockKey(outSpecs[i]!, outAlgos[i]!), outValues[i]!);
      outFns = m;
    }
    if (outFns.size > 0) functionsOut.set(owner, outFns);
    if (outFns !== lockedFns) for (const [key, v] of lockedFns) {
      if (outFns.has(key)) continue;
      const space = `${owner}|${key.split("|")[0]}`;
      if (!retiredNow.some((r) => r.kind === "function" && r.was === key && r.space === space)) retiredNow.push({ kind: "function", space, value: v, was: key });
    }
    return { locators, rows };
  };

  const anycastByName = new Map(plan.anycast.map((a) => [a.name, a]));
  const anycastTables = new Map<string, { locators: LocatorEntry[]; rows: SidRow[] }>();
  for (const a of plan.anycast) anycastTables.set(a.name, allocOwner(`anycast:${a.name}`, a.place, a.algorithms, a.name, true));
  // room for every SID at once: each node's specs (one per algorithm it runs unless the spec has
  // its own) and its anycast groups' SIDs of those algorithms
  let expected = 0;
  for (const n of plan.nodes) {
    const list = specsFor.get(n.name) ?? NO_SPECS;
    for (let k = 0; k < list.length; k++) expected += list[k]!.algos?.length ?? n.algorithms.length;
    for (const an of n.anycast) for (const r of anycastTables.get(an)?.rows ?? []) if (n.algorithms.includes(r.algorithm)) expected++;
  }
  sink.reserve(expected);
  for (const n of plan.nodes) {
    const { locators, rows } = allocOwner(n.name, n.place, n.algorithms, undefined, false);
    for (const an of n.anycast) {
      const a = anycastByName.get(an);
      const t = anycastTables.get(an);
      if (!a || !t) continue;
      for (const l of t.locators) if (n.algorithms.includes(l.algorithm)) locators.push(l);
      for (const r of t.rows) if (n.algorithms.includes(r.algorithm)) rows.push(r);
    }
    sink.writeNode(n.name, sortLocators(locators), rows);
  }
  if (diags.length > 0 || (moves.length > 0 && !allow)) return { ok: false, diagnostics: diags, moves };

  // Functions of owners that left the plan are not kept: the owner's node value is retired, and
  // its locator with it.
  const newRetired = dedupeRetired([...retired, ...retiredNow]);
  const newLock: Lock = {
    plan: plan.name,
    layout,
    groups: groupValues,
    nodes: leafValues,
    functions: functionsOut,
    retired: newRetired,
  };

  const packed = sink.finish();
  return {
    ok: true,
    allocation: withTable(packed, {
      plan,
      lock: newLock,
      groupValues,
      nodeValues,
      levelUsage: levelUsage(plan, groupValues, leafValues),
      poolUsage: [...poolMax.entries()].sort(([a], [b]) => (a < b ? -1 : 1)).map(([name, u]) => ({ name, used: u.used, capacity: u.cap, fullest: u.where, fullestUsed: u.used })),
      moves,
      retiredNow: dedupeRetired(retiredNow),
      added,
    }),
  };
}

/**
 * The allocation with `packed` and a `table` made from it on first use (nodes sorted by name,
 * each node's SIDs by address, as the sink wrote them). Made out here, not inside allocate: a
 * getter there would keep every local of the run alive as long as the allocation.
 */
function withTable(packed: PackedSidTable, rest: Omit<Allocation, "table" | "packed">): Allocation {
  return {
    ...rest,
    packed,
    get table(): SidTable {
      return packed.toTable();
    },
  };
}

/** Why a pinned function value cannot be used, or undefined (reserved values, C-SID 0, pools; RFC 9800 §5). */
function pinnedFunctionProblem(plan: Plan, L: Layout, field: bigint, v: bigint): string | undefined {
  if (inRanges(v, plan.reservedFunctions)) return "the value is in reserved-functions";
  if (L.kind !== "compressed") return undefined;
  if (L.twoCsid) {
    if (v === 0n) return "a local C-SID of 0 is reserved (RFC 9800 §5)";
    if (!inRanges(v, L.lib)) return "a local C-SID must come from the block's local-pool (LIB)";
    return undefined;
  }
  const csid = (field << BigInt(L.functionBits)) | v;
  if (csid === 0n) return "C-SID value 0 is reserved (RFC 9800 §5)";
  if (!inRanges(csid, L.gib)) return `its C-SID 0x${csid.toString(16)} is outside the block's global-pool (GIB)`;
  return undefined;
}

function dedupeRetired(list: readonly RetiredValue[]): RetiredValue[] {
  const seen = new Set<string>();
  const out: RetiredValue[] = [];
  for (const r of list) {
    const k = `${r.kind}|${r.space}|${r.value}`;
    if (seen.has(k)) continue;
    seen.add(k);
    out.push(r);
  }
  return out;
}

/** How many candidate values one item may try at a level before the allocator gives up (bounds time on huge, mostly reserved levels). */
const MAX_LEVEL_PROBES = 1 << 22;

interface LevelItem {
  readonly id: string;
  readonly pinned: bigint | undefined;
  readonly locked: bigint | undefined;
  readonly at: (string | number)[];
  readonly label: string;
}

/**
 * Values for the items of one parent at one level: pins first, then locked values, then new
 * items take the first free value in the level's RFC 3531 order.
 */
function assignLevel(
  level: Level,
  items: readonly LevelItem[],
  retired: ReadonlySet<bigint>,
  fits: (id: string, v: bigint) => boolean,
  allow: boolean,
  moves: Move[],
  diags: Diagnostic[],
  locate: Plan["locate"],
  leaving: ReadonlySet<bigint> = new Set(),
): Map<string, bigint> {
  const failed = new Set<string>();
  const out = new Map<string, bigint>();
  const taken = new Set<bigint>([...retired, ...leaving]);
  const hexv = (v: bigint) => "0x" + v.toString(16);
  const isReserved = (v: bigint) => inRanges(v, level.reserved);
  const pinnedBy = new Map<bigint, string>();
  for (const it of items) {
    if (it.pinned === undefined) continue;
    const other = pinnedBy.get(it.pinned);
    if (other) {
      failed.add(it.id);
      diags.push({ code: "alloc/pin-conflict", message: `${it.label} pins ${level.name} value ${hexv(it.pinned)}, already pinned by ${other}; each value is used once per parent`, location: locate(it.at) });
      continue;
    }
    pinnedBy.set(it.pinned, it.label);
  }
  for (const it of items) {
    if (it.pinned === undefined) continue;
    if (it.locked !== undefined && it.locked !== it.pinned) {
      moves.push({ what: it.label, from: hexv(it.locked), to: hexv(it.pinned), reason: "its pinned value changed" });
      if (!allow) continue;
    }
    if (retired.has(it.pinned) && it.locked !== it.pinned) {
      failed.add(it.id);
      diags.push({ code: "alloc/pin-retired", message: `${it.label} pins ${level.name} value ${hexv(it.pinned)}, which is retired (it belonged to an item removed from the plan); release it first or pick another`, location: locate(it.at) });
      continue;
    }
    if (isReserved(it.pinned) || !fits(it.id, it.pinned)) {
      failed.add(it.id);
      diags.push({ code: "alloc/pin", message: `${it.label} pins ${level.name} value ${hexv(it.pinned)}, which is ${isReserved(it.pinned) ? `reserved at level ${quote(level.name)}` : "not usable: the node C-SID it makes would be 0 or outside the block's global-pool (GIB), RFC 9800 §5"}; pick another value`, location: locate(it.at) });
      continue;
    }
    out.set(it.id, it.pinned);
    taken.add(it.pinned);
  }
  for (const it of items) {
    if (it.pinned !== undefined || it.locked === undefined) continue;
    const bad = it.locked >= 1n << BigInt(level.bits) || isReserved(it.locked) || !fits(it.id, it.locked) || (taken.has(it.locked) && !retired.has(it.locked));
    if (bad) {
      moves.push({ what: it.label, from: hexv(it.locked), to: "(a new value)", reason: `${hexv(it.locked)} is no longer usable at level ${level.name} (reserved, out of range, outside the global pool, or now pinned by another item)` });
      if (!allow) continue;
    } else {
      out.set(it.id, it.locked);
      taken.add(it.locked);
    }
  }
  const bits = bitOrder(level.order, level.bits);
  const size = 1n << BigInt(level.bits);
  const counting = level.order === "sequential" || level.order === "rightmost";
  let k = 0n;
  for (const it of items) {
    if (out.has(it.id) || failed.has(it.id)) continue;
    if (it.pinned !== undefined) continue;
    let found: bigint | undefined;
    let probes = 0;
    while (k < size && probes++ < MAX_LEVEL_PROBES) {
      const v = nthValue(level.order, level.bits, k++, bits);
      if (isReserved(v)) {
        // in counting order a reserved range is one jump, not one step per value
        if (counting) for (const r of level.reserved) if (v >= r.first && v <= r.last) k = r.last + 1n;
        continue;
      }
      if (!taken.has(v) && fits(it.id, v)) {
        found = v;
        break;
      }
    }
    if (found === undefined) {
      const gaveUp = probes > MAX_LEVEL_PROBES ? ` (gave up after trying ${MAX_LEVEL_PROBES} values)` : "";
      diags.push({ code: "alloc/level-full", message: `level ${quote(level.name)} (${level.bits} bits, ${levelCapacity(level)} usable values) has no free value left for ${it.label}${gaveUp} (retired, reserved and global-pool limits count); widen the level or release retired values`, location: locate(it.at) });
      continue;
    }
    out.set(it.id, found);
    taken.add(found);
  }
  return out;
}

/**
 * The key of a SID in the lock: `algorithm|spec key`. A spec carries the key of its first
 * algorithm, made when first asked for (against an up-to-date lock read by the fast reader,
 * never), and those of its other algorithms (an adjacency's) in a list; the End specs, shared by
 * every node and algorithm, keep theirs by algorithm. (Not a WeakMap over a million specs: its
 * entries cost the garbage collector dearly.)
 */
function lockKey(s: SidSpec, algo: number): string {
  const algos = s.algos;
  if (algos !== undefined && algos[0] === algo) return (s.lockKey ??= flatKey(algo, s.key));
  // the others by their place in the spec's algorithms (End specs: by the algorithm itself)
  const byAlgo = (s.lockKeys ??= []);
  const k = algos === undefined ? algo : algos.indexOf(algo);
  return (byAlgo[k] ??= flatKey(algo, s.key));
}

/** Shared one-algorithm lists for the specs of one algorithm (a list each would be a million small arrays). */
const ONE_ALGO: (readonly number[])[] = [];
function oneAlgo(a: number): readonly number[] {
  return (ONE_ALGO[a] ??= Object.freeze([a]));
}

/**
 * `algorithm|key` as one flat string. A template literal would give a rope of its parts, which
 * V8 flattens again on every first Map lookup; Array.join writes the characters once. Looking a
 * million such keys up in the lock took about three times as long as ropes (measured).
 */
function flatKey(algo: number, key: string): string {
  return [algo, "|", key].join("");
}

/**
 * What the allocator will create for one owner: the binding, its behaviour and pool. A class, so
 * that every spec has the same fields from the start (the allocator reads them a million times;
 * objects that gained fields one by one would make those reads slow).
 */
class SidSpec implements RowSource {
  /** `algorithm|key` for the first of the spec's algorithms (see lockKey), made when first asked for. */
  lockKey: string | undefined = undefined;
  /** lockKey's keys for the spec's other algorithms (by place in `algos`; by algorithm for the End specs of every algorithm). */
  lockKeys: string[] | undefined = undefined;
  /** keyHash(key), for the fast reader's functions (LockedFunctions.lookup). */
  keyHash: number | undefined = undefined;
  /** shapeOf's answer (shape) for the last layout it was asked about (shapeLayout). */
  shapeLayout: Layout | undefined = undefined;
  shape: SidShape | undefined = undefined;

  constructor(
    readonly key: string,
    readonly behavior: BehaviorName,
    readonly flavors: readonly Flavor[],
    readonly pool: PoolKind,
    /** The algorithms the SID is made for; undefined: every algorithm of the node. */
    readonly algos: readonly number[] | undefined,
    readonly pinned: bigint | undefined,
    readonly context: SidContext,
    readonly at: (string | number)[],
    readonly noFunction = false,
    /** The spec's place in buildSpecs's list of every spec (the sink's source id); -1 until it has one. */
    public rowId = -1,
  ) {}

  /** The same SID without a function field (in two-C-SID layouts the first End SID is the node's global C-SID alone). */
  withoutFunction(): SidSpec {
    const c = new SidSpec(this.key, this.behavior, this.flavors, this.pool, this.algos, this.pinned, this.context, this.at, true, this.rowId);
    c.keyHash = this.keyHash;
    return c;
  }
}

const NO_SPECS: readonly SidSpec[] = Object.freeze([]);

/** The End.X variants of a link, by its protection. */
const PROTECTION_VARIANTS = {
  unprotected: Object.freeze(["unprotected"] as const),
  protected: Object.freeze(["protected"] as const),
  both: Object.freeze(["unprotected", "protected"] as const),
} as const;

/** The flavour list of the service SIDs, shared (flavour lists are never changed once made). */
const NO_FLAVORS: readonly Flavor[] = Object.freeze([]);

const endSpecCache = new WeakMap<Plan, readonly SidSpec[]>();

function endSpecs(plan: Plan, _algo: number): readonly SidSpec[] {
  const c = endSpecCache.get(plan);
  if (c) return c;
  const specs = plan.endSids.map((f, i) => new SidSpec(`End|${normalizeFlavors(f).join("+") || "plain"}`, "End", f, "end", undefined, undefined, {}, ["end-sids", i], false, i));
  endSpecCache.set(plan, specs);
  return specs;
}

/** Each node's specs, and every spec by its rowId (the End specs first, with ids 0..). */
function buildSpecs(plan: Plan, nodes: ReadonlyMap<string, PlanNode>, diags: Diagnostic[]): { byNode: Map<string, SidSpec[]>; all: SidSpec[] } {
  const out = new Map<string, SidSpec[]>();
  const all: SidSpec[] = [...endSpecs(plan, 0)];
  // a spec may be shared by several nodes (a VRF's PEs); its lock key is the same for all of them
  /** A node's list of specs, made when first asked for. */
  const listOf = (node: string): SidSpec[] => {
    let list = out.get(node);
    if (!list) out.set(node, (list = []));
    return list;
  };
  const addTo = (list: SidSpec[], s: SidSpec) => {
    if (s.rowId < 0) {
      s.rowId = all.length;
      all.push(s);
    }
    list.push(s);
  };
  const add = (node: string, s: SidSpec) => addTo(listOf(node), s);
  for (const n of plan.nodes) {
    const list = listOf(n.name);
    for (const s of endSpecs(plan, 0)) addTo(list, s);
  }
  // adjacency keys per node, to tell parallel links apart
  const seen = new Map<string, Set<string>>();
  // (indexed loops, no destructuring: this runs once per plan, mostly before it is optimised,
  // where each iterator step would make an object)
  const links = plan.links;
  for (let li = 0; li < links.length; li++) {
    const l = links[li]!;
    const ends = l.ends;
    const na = nodes.get(ends[0].node);
    const nb = nodes.get(ends[1].node);
    if (!na || !nb) continue;
    const algos = l.algorithms ?? na.algorithms.filter((x) => nb.algorithms.includes(x));
    const variants = PROTECTION_VARIANTS[l.protection];
    for (let e = 0; e < 2; e++) {
      const me = ends[e]!;
      const peer = ends[1 - e]!;
      for (let vi = 0; vi < variants.length; vi++) {
        const prot = variants[vi]!;
        // flat (see flatKey): the set below and the lock key hash it
        const key = ["End.X|", peer.node, "|", me.iface ?? "", "|", prot].join("");
        let mine = seen.get(me.node);
        if (!mine) seen.set(me.node, (mine = new Set()));
        if (mine.has(key)) {
          diags.push({ code: "plan/parallel-link", message: `two links join ${quote(me.node)} and ${quote(peer.node)} without telling them apart; give each an interface on both ends`, location: plan.locate(["links", l.index]) });
          continue;
        }
        mine.add(key);
        const pinned = prot === "protected" && variants.length === 2 ? me.pinnedProtected : prot === "protected" ? (me.pinnedProtected ?? me.pinned) : me.pinned;
        // (object literals, not spreads: a spread of a temporary object costs about three times as much)
        const context: SidContext = me.iface ? { neighbor: peer.node, interface: me.iface, protection: prot, link: l.name } : { neighbor: peer.node, protection: prot, link: l.name };
        const at = ["links", l.index, "ends", ends.indexOf(me)];
        // one spec for the adjacency's SIDs of every algorithm (they share key, context and path)
        if (algos.length > 0) addTo(listOf(me.node), new SidSpec(key, "End.X", plan.adjacencyFlavors, "adjacency", algos, pinned, context, at));
      }
    }
  }
  plan.vrfs.forEach((v, i) => {
    const fams = v.families;
    const behaviors: { b: BehaviorName; fam: string }[] =
      fams.length === 2 && v.mode === "combined" ? [{ b: "End.DT46", fam: "ipv4+ipv6" }] : fams.map((f) => ({ b: f === "ipv4" ? ("End.DT4" as const) : ("End.DT6" as const), fam: f }));
    // one spec per VRF and behaviour, shared by all its PEs (specs are never changed once made)
    const specs = behaviors.map(({ b, fam }) => new SidSpec(`${b}|${v.name}`, b, NO_FLAVORS, "service", oneAlgo(v.algorithm), undefined, { vrf: v.name, family: fam, ...(v.table !== undefined ? { table: String(v.table) } : {}) }, ["vrfs", i]));
    // each PE's list looked up once for all the VRF's specs
    const pes = v.pes;
    for (let k = 0; k < pes.length; k++) {
      const list = listOf(pes[k]!);
      for (let j = 0; j < specs.length; j++) addTo(list, specs[j]!);
    }
    v.ces.forEach((c, j) => {
      const b: BehaviorName = c.family === "ipv4" ? "End.DX4" : "End.DX6";
      const context: SidContext = c.iface ? { vrf: v.name, ce: c.name, family: c.family, interface: c.iface } : { vrf: v.name, ce: c.name, family: c.family };
      add(c.pe, new SidSpec(`${b}|${v.name}|${c.name}`, b, NO_FLAVORS, "service", oneAlgo(v.algorithm), undefined, context, ["vrfs", i, "ces", j]));
    });
  });
  plan.l2.forEach((s, i) => {
    if (s.kind === "bridge") {
      const context = { "bridge-domain": s.name };
      const unicast = new SidSpec(`End.DT2U|${s.name}`, "End.DT2U", NO_FLAVORS, "l2", oneAlgo(s.algorithm), undefined, context, ["l2-services", i]);
      const multicast = new SidSpec(`End.DT2M|${s.name}`, "End.DT2M", NO_FLAVORS, "l2", oneAlgo(s.algorithm), undefined, context, ["l2-services", i]);
      for (let k = 0; k < s.nodes.length; k++) {
        const list = listOf(s.nodes[k]!);
        addTo(list, unicast);
        addTo(list, multicast);
      }
    } else {
      const b: BehaviorName = s.kind === "wire" ? "End.DX2" : "End.DX2V";
      s.attachments.forEach((a, j) => {
        const context: Record<string, string> = { service: s.name };
        if (a.iface) context.interface = a.iface;
        if (a.vlan !== undefined) context.vlan = String(a.vlan);
        add(a.node, new SidSpec(`${b}|${s.name}|${a.iface ?? ""}|${a.vlan ?? ""}`, b, NO_FLAVORS, "l2", oneAlgo(s.algorithm), undefined, context, ["l2-services", i, "attachments", j]));
      });
    }
  });
  plan.policies.forEach((p, i) => {
    const context: Record<string, string> = { policy: p.name };
    if (p.endpoint) context.endpoint = p.endpoint;
    if (p.color !== undefined) context.color = String(p.color);
    add(p.node, new SidSpec(`${p.behavior}|${p.name}`, p.behavior, NO_FLAVORS, "binding", oneAlgo(p.algorithm), undefined, context, ["policies", i]));
  });
  plan.tables.forEach((t, i) => {
    const spec = new SidSpec(`End.T|${t.name}`, "End.T", t.flavors, "table", oneAlgo(0), undefined, { table: t.table !== undefined ? `${t.name}(${t.table})` : t.name }, ["tables", i]);
    for (const n of t.nodes) add(n, spec);
  });
  return { byNode: out, all };
}

/** Each pool kind's place in POOL_KINDS. */
const POOL_INDEX = Object.fromEntries(POOL_KINDS.map((k, i) => [k, i])) as Record<PoolKind, number>;

const disjointCache = new WeakMap<Record<PoolKind, ValueRange[]>, boolean>();

/** True when no value lies in two of the pools (the default split; pools a plan names may overlap). */
function poolsDisjoint(pools: Record<PoolKind, ValueRange[]>): boolean {
  let d = disjointCache.get(pools);
  if (d === undefined) {
    const all = POOL_KINDS.flatMap((k) => pools[k]).sort((a, b) => (a.first < b.first ? -1 : a.first > b.first ? 1 : 0));
    d = all.every((r, i) => i === 0 || all[i - 1]!.last < r.first);
    disjointCache.set(pools, d);
  }
  return d;
}

const poolCache = new WeakMap<Layout, { plan: Plan; pools: Record<PoolKind, ValueRange[]> }>();

/** poolsFor, made once per plan and layout (the allocator asks for every locator). */
function cachedPools(plan: Plan, L: Layout): Record<PoolKind, ValueRange[]> {
  const c = poolCache.get(L);
  if (c && c.plan === plan) return c.pools;
  const pools = poolsFor(plan, L);
  poolCache.set(L, { plan, pools });
  return pools;
}

/**
 * Function pools for a layout. Pools the plan names are used as given; the others come from our
 * own default split of the function space (classic) or of the local pool (two-C-SID layouts):
 * sixteen equal parts — end 1, adjacency 3, service 4, l2 4, binding 2, table 2.
 */
export function poolsFor(plan: Plan, L: Layout): Record<PoolKind, ValueRange[]> {
  const base: ValueRange[] =
    L.kind === "compressed" && L.twoCsid ? [...L.lib] : [{ first: L.kind === "classic" ? 0n : 0n, last: (1n << BigInt(L.functionBits)) - 1n }];
  const total = rangeSize(base);
  const shares: [PoolKind, number][] = [
    ["end", 1],
    ["adjacency", 3],
    ["service", 4],
    ["l2", 4],
    ["binding", 2],
    ["table", 2],
  ];
  const out = {} as Record<PoolKind, ValueRange[]>;
  if (total < 16n) {
    for (const [k] of shares) out[k] = plan.functionPools[k] ? [...plan.functionPools[k]!] : base;
    return out;
  }
  const part = total / 16n;
  let offset = 0n;
  for (const [k, n] of shares) {
    const from = offset;
    const to = k === "table" ? total - 1n : offset + part * BigInt(n) - 1n;
    offset = to + 1n;
    out[k] = plan.functionPools[k] ? [...plan.functionPools[k]!] : sliceRanges(base, from, to);
  }
  return out;
}

/** The values at flat offsets from..to across a list of ranges. */
function sliceRanges(rs: readonly ValueRange[], from: bigint, to: bigint): ValueRange[] {
  const out: ValueRange[] = [];
  let pos = 0n;
  for (const r of rs) {
    const n = r.last - r.first + 1n;
    const lo = from > pos ? from - pos : 0n;
    const hi = to < pos + n - 1n ? to - pos : n - 1n;
    if (lo <= hi && lo < n && hi >= 0n) out.push({ first: r.first + lo, last: r.first + hi });
    pos += n;
  }
  return out;
}

/** The flavours a SID carries in a layout: its own plus the block's C-SID flavour where the registry has that combination. */
export function flavorsIn(L: Layout, behavior: BehaviorName, own: readonly Flavor[]): Flavor[] {
  if (L.kind === "compressed") {
    const withC = normalizeFlavors([...own, L.flavor]);
    if (codepointOf(behavior, withC) !== undefined) return withC;
  }
  return normalizeFlavors(own);
}

/** What every SID of one behaviour, flavour list and layout shares: flavours, codepoint, structure. */
interface SidShape {
  readonly behavior: BehaviorName;
  readonly flavors: Flavor[];
  readonly codepoint: number | undefined;
  readonly structure: SidStructure;
}

/** Shapes per layout, made once (a plan has a handful; a million SIDs would otherwise make a million copies). */
const shapes = new WeakMap<Layout, Map<string, SidShape>>();

/**
 * shapeOf's last answer made by key, and what it was for (neighbouring specs mostly have the same
 * shape: a node's End.X specs). It holds on to one layout at most, until another is asked about.
 */
let lastShape: { L: Layout; behavior: BehaviorName; noFunction: boolean; flavors: readonly Flavor[]; shape: SidShape } | undefined;

function shapeOf(L: Layout, s: SidSpec): SidShape {
  // the spec remembers its shape for the last layout asked (a spec is shared by many SIDs)
  if (s.shapeLayout === L) return s.shape!;
  const last = lastShape;
  let shape: SidShape;
  if (last !== undefined && last.L === L && last.behavior === s.behavior && last.noFunction === s.noFunction && last.flavors === s.flavors) shape = last.shape;
  else lastShape = { L, behavior: s.behavior, noFunction: s.noFunction, flavors: s.flavors, shape: (shape = shapeByKey(L, s)) };
  s.shapeLayout = L;
  s.shape = shape;
  return shape;
}

function shapeByKey(L: Layout, s: SidSpec): SidShape {
  let byKey = shapes.get(L);
  if (!byKey) shapes.set(L, (byKey = new Map()));
  const k = `${s.behavior}|${s.noFunction ? 1 : 0}|${s.flavors.join("+")}`;
  let shape = byKey.get(k);
  if (!shape) {
    const flavors = flavorsIn(L, s.behavior, s.flavors);
    const compressed = flavors.includes("NEXT-CSID") || flavors.includes("REPLACE-CSID");
    const fnBits = s.noFunction ? 0 : L.functionBits;
    const used = L.blockBits + L.nodeBits + fnBits;
    let argument: number;
    if (compressed) argument = 128 - used; // RFC 9800 §8: the rest of the address is the argument
    else argument = s.behavior === "End.DT2M" ? L.argumentBits : 0; // RFC 8986 §4.12: only End.DT2M takes one
    shape = { behavior: s.behavior, flavors, codepoint: codepointOf(s.behavior, flavors), structure: { block: L.blockBits, node: L.nodeBits, function: fnBits, argument } };
    byKey.set(k, shape);
  }
  return shape;
}

/** What the SIDs carved from one locator share: its layout, entry, first address (as a bigint and as words) and the function's shift. */
interface Carve {
  readonly L: Layout;
  readonly locator: LocatorEntry;
  readonly first: Addr;
  readonly words: readonly [number, number, number, number];
  /** Bits below the function field. */
  readonly fnShift: number;
}


/** Fill `r` with one SID: the locator's words with the function value placed below the node field (none for a SID without a function). */
function fillRow(r: SidRow, c: Carve, algo: number, s: SidSpec, fn: bigint): void {
  r.algorithm = algo;
  r.shape = shapeOf(c.L, s);
  r.fn = fn;
  r.source = s;
  r.locator = c.locator;
  setSidWords(r, c.words, c.first, c.fnShift, s.noFunction ? 0n : fn);
}

function sortLocators(ls: LocatorEntry[]): LocatorEntry[] {
  return ls.sort((a, b) => a.algorithm - b.algorithm || (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : 0) || a.prefix.len - b.prefix.len);
}

function levelUsage(plan: Plan, groups: ReadonlyMap<string, bigint>, leaves: ReadonlyMap<string, { place: string; value: bigint }>): UsageRow[] {
  const rows: UsageRow[] = [];
  plan.levels.forEach((level, depth) => {
    const counts = new Map<string, bigint>();
    if (depth < plan.levels.length - 1) {
      for (const g of plan.groups) if (g.depth === depth && groups.has(g.path)) counts.set(g.parent ?? "", (counts.get(g.parent ?? "") ?? 0n) + 1n);
    } else {
      for (const l of leaves.values()) counts.set(l.place, (counts.get(l.place) ?? 0n) + 1n);
    }
    let fullest = "";
    let max = 0n;
    for (const [k, v] of [...counts.entries()].sort(([a], [b]) => (a < b ? -1 : 1))) {
      if (v > max) {
        max = v;
        fullest = k;
      }
    }
    rows.push({ name: level.name, used: max, capacity: levelCapacity(level), fullest: fullest || "(top)", fullestUsed: max });
  });
  return rows;
}
