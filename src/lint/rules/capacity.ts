/**
 * Room to grow: a level, a function pool, or the global / local C-SID pool (GIB / LIB) of a
 * compressed block filled above the plan's capacity threshold (80 % unless lint.capacity-threshold
 * says otherwise).
 */
import { rangeSize } from "../../plan/normalize.js";
import { getField } from "../../net/uint128.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import type { Block, PoolKind } from "../../plan/model.js";
import type { Rule, RuleContext } from "../types.js";
import { PrefixIndex, sidField, wordRangeAt } from "../shared/prefixes.js";

/** Share of a capacity, for messages: "13 of 15 (87 %)". */
const share = (used: bigint, cap: bigint) => `${used} of ${cap} (${cap > 0n ? Math.floor(Number((used * 1000n) / cap)) / 10 : 100} %)`;

/** A bigint as data: a number when it is exact, its decimal text otherwise. */
const num = (v: bigint): number | string => (v <= BigInt(Number.MAX_SAFE_INTEGER) ? Number(v) : v.toString());

/** The threshold test and the report of one full level or pool; shared by the parts of the check. */
export interface CapacityReporter {
  readonly over: (used: bigint, cap: bigint) => boolean;
  readonly report: (kind: string, name: string, where: string, used: bigint, cap: bigint, location: SourceLocation, objects: string[], hint: string) => void;
}

export function capacityReporter(ctx: RuleContext): CapacityReporter {
  const plan = ctx.input.plan!;
  const threshold = plan.lint.capacityThreshold;
  // used / capacity > threshold, in exact integers (threshold to 1e-6).
  const over = (used: bigint, cap: bigint) => cap <= 0n ? used > 0n : used * 1_000_000n > cap * BigInt(Math.round(threshold * 1_000_000));
  const pct = `${Math.round(threshold * 1000) / 10} %`;
  const report = (kind: string, name: string, where: string, used: bigint, cap: bigint, location: SourceLocation, objects: string[], hint: string) =>
    ctx.report({
      message: `${kind} ${name} is ${share(used, cap)} full${where ? ` in ${where}` : ""}, above the ${pct} threshold`,
      location,
      objects,
      hint,
      data: { kind, name, where, used: num(used), capacity: num(cap), threshold },
    });
  return { over, report };
}

/** Levels and function pools, from the allocator's usage rows (plans only). */
export function reportLevelsAndPools(ctx: RuleContext, { over, report }: CapacityReporter): void {
  const plan = ctx.input.plan!;
  const alloc = ctx.input.allocation;
  if (alloc) {
    // Levels: the allocator reports the fullest parent of each level.
    for (const u of alloc.levelUsage) {
      if (!over(u.used, u.capacity)) continue;
      const i = plan.levels.findIndex((l) => l.name === u.name);
      const where = u.fullest === "(top)" ? "" : (u.fullest ?? "");
      report("level", u.name, where, u.used, u.capacity, ctx.locatePlan(["levels", i, "bits"]), [u.name, ...(where ? [where] : [])], "widen the level (more bits) before it fills, or split the fullest part");
    }
    // Function pools: "block/kind", the fullest locator of that block.
    for (const u of alloc.poolUsage) {
      if (!over(u.used, u.capacity)) continue;
      const cut = u.name.lastIndexOf("/");
      const blockName = u.name.slice(0, cut);
      const kind = u.name.slice(cut + 1) as PoolKind;
      const b = plan.blocks.find((x) => x.name === blockName);
      const location = plan.functionPools[kind] ? ctx.locatePlan(["function-pools", kind]) : ctx.locatePlan(b ? ["blocks", b.index] : []);
      const where = (u.fullest ?? "").replace(/^anycast:/, "anycast group ");
      report("pool", u.name, where, u.used, u.capacity, location, [u.name, ...(where ? [u.fullest!] : [])], "widen the pool or the function field");
    }
  }

}

/** C-SID values in use per compressed block: global C-SIDs, and local C-SIDs per "node|global C-SID". */
export interface CsidUse {
  readonly globals: ReadonlyMap<string, ReadonlySet<number | bigint>>;
  readonly locals: ReadonlyMap<string, ReadonlyMap<string, ReadonlySet<number | bigint>>>;
}

/** The GIB and LIB findings of the compressed blocks, from the C-SIDs in use. */
export function reportCsidPools(ctx: RuleContext, { over, report }: CapacityReporter, compressed: readonly Block[], { globals, locals }: CsidUse): void {
  for (const b of compressed) {
    if (b.layout.kind !== "compressed") continue;
    const gib = rangeSize(b.layout.gib);
    const used = BigInt(globals.get(b.name)?.size ?? 0);
    if (gib > 0n && over(used, gib)) {
      const what = b.layout.twoCsid ? "node C-SIDs" : "C-SIDs";
      report("gib", b.name, "", used, gib, ctx.locatePlan(["blocks", b.index, "compression", "global-pool"]), [b.name], `widen the global pool (GIB) of block ${b.name}; ${what} come from it`);
    }
    const lib = rangeSize(b.layout.lib);
    if (!b.layout.twoCsid || lib === 0n) continue;
    let fullest = "";
    let max = 0n;
    for (const [key, set] of [...(locals.get(b.name) ?? new Map<string, ReadonlySet<number | bigint>>()).entries()].sort(([a], [c]) => (a < c ? -1 : a > c ? 1 : 0))) {
      if (BigInt(set.size) > max) {
        max = BigInt(set.size);
        fullest = key.slice(0, key.lastIndexOf("|"));
      }
    }
    if (over(max, lib)) {
      report("lib", b.name, fullest, max, lib, ctx.locatePlan(["blocks", b.index, "compression", "local-pool"]), [b.name, fullest], `widen the local pool (LIB) of block ${b.name}, or move services off ${fullest}`);
    }
  }
}

export const capacity: Rule = {
  meta: {
    id: "capacity",
    severity: "warning",
    summary: "Leave growth room in every level, function pool and C-SID pool.",
    rationale:
      "A full level means the next site or router needs a renumbering of its neighbours; a full pool means the next adjacency or VRF has no function value. RFC 5375 advises keeping a growth zone per delegation; the threshold (80 % by default) is our own choice, not a standard.",
    source: "common practice; RFC 5375 §2.4 (growth room)",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const r = capacityReporter(ctx);
    reportLevelsAndPools(ctx, r);

    // GIB and LIB of compressed blocks (RFC 9800 §5), counted from the table so that an inventory
    // linted with --plan is judged too. Two-C-SID layouts: one global C-SID per locator (anycast
    // locators count once), local C-SIDs per locator; one-C-SID layouts: every SID's C-SID
    // (node + function) is global.
    const compressed = plan.blocks.filter((b) => b.layout.kind === "compressed");
    if (compressed.length === 0) return;
    const { table: t, locatorOrder } = ctx.packed;
    const index = new PrefixIndex(compressed.map((b) => ({ prefix: b.prefix, value: b })));
    // C-SID values: numbers for C-SIDs of up to 32 bits (bigints beyond), one kind per block
    const globals = new Map<string, Set<number | bigint>>();
    const locals = new Map<string, Map<string, Set<number | bigint>>>(); // block -> "node|locator" -> local C-SIDs
    for (const id of locatorOrder) {
      const prefix = t.prefixes[t.locPrefix[id]!]!;
      const b = index.containingRange(wordRangeAt(t, t.locPrefix[id]!))?.value;
      if (!b || b.layout.kind !== "compressed" || !b.layout.twoCsid) continue;
      const L = b.layout;
      if (prefix.len < L.blockBits + L.csidBits) continue;
      const set = globals.get(b.name) ?? new Set<number | bigint>();
      set.add(getField(prefix.first, L.blockBits, L.csidBits));
      globals.set(b.name, set);
    }
    // The local C-SIDs of one node and global C-SID: SIDs of one locator are mostly neighbours,
    // so the set is looked up only when the node or global C-SID changes.
    let lastNode = -1;
    let lastGlobal: number | bigint = -1;
    let lastBlock = "";
    let lastSet: Set<number | bigint> | undefined;
    for (let i = 0; i < t.count; i++) {
      const b = index.containingSid(t, i)?.value;
      if (!b || b.layout.kind !== "compressed") continue;
      const L = b.layout;
      if (L.twoCsid) {
        if (L.blockBits + 2 * L.csidBits > 128) continue;
        const local = sidField(t, i, L.blockBits + L.csidBits, L.csidBits);
        if (local === 0 || local === 0n) continue; // the node's own End SID: global C-SID alone (RFC 9800 §8)
        const g = sidField(t, i, L.blockBits, L.csidBits);
        const n = t.node[i]!;
        if (!lastSet || n !== lastNode || g !== lastGlobal || b.name !== lastBlock) {
          const key = `${t.nodeNames[n]}|${g.toString(16)}`;
          const perNode = locals.get(b.name) ?? new Map<string, Set<number | bigint>>();
          lastSet = perNode.get(key) ?? new Set<number | bigint>();
          perNode.set(key, lastSet);
          locals.set(b.name, perNode);
          lastNode = n;
          lastGlobal = g;
          lastBlock = b.name;
        }
        lastSet.add(local);
      } else {
        const set = globals.get(b.name) ?? new Set<number | bigint>();
        set.add(sidField(t, i, L.blockBits, L.csidBits));
        globals.set(b.name, set);
      }
    }
    reportCsidPools(ctx, r, compressed, { globals, locals });
  },
};
