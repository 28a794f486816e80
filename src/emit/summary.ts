/**
 * The allocation summary printed by `sidcarve allocate`: per block, nodes and locators; SIDs per
 * behaviour; use of every level and pool (used / capacity).
 */
import Table from "cli-table3";
import type { Allocation } from "../alloc/allocate.js";

const pct = (used: bigint, cap: bigint) => (cap === 0n ? "-" : `${((Number(used) / Number(cap)) * 100).toFixed(1)}%`);

function table(head: string[]): InstanceType<typeof Table> {
  return new Table({ head, style: { head: [], border: [] } });
}

/** Plain-text summary (no colour), deterministic. */
export function allocationSummary(a: Allocation): string {
  const out: string[] = [];
  const blocks = table(["block", "prefix", "algorithms", "nodes", "locators", "SIDs"]);
  // from the allocation's columns: each locator's block, then one pass over the SIDs
  const p = a.packed;
  const blockIndex = new Map(a.plan.blocks.map((b, k) => [b.name, k]));
  const nodesIn = a.plan.blocks.map(() => new Set<number>());
  const locatorsIn = a.plan.blocks.map(() => 0);
  const sidsIn = a.plan.blocks.map(() => 0);
  const blockOf = new Int32Array(p.locatorCount).fill(-1);
  for (let id = 0; id < p.locatorCount; id++) {
    if (p.unlisted.has(id)) continue;
    const l = p.locatorEntry(id);
    const k = blockIndex.get(l.block);
    if (k === undefined) continue;
    blockOf[id] = k;
    nodesIn[k]!.add(p.locNode[id]!);
    if (l.anycast === "") locatorsIn[k]!++;
  }
  // behaviour and flavour set of each SID, counted by their ids
  const byShape = new Map<number, number>();
  const flavorSets = p.flavorSets.length;
  for (let i = 0; i < p.count; i++) {
    const loc = p.locator[i]!;
    if (loc >= 0 && blockOf[loc]! >= 0) sidsIn[blockOf[loc]!]!++;
    const shape = p.behavior[i]! * flavorSets + p.flavorSet[i]!;
    byShape.set(shape, (byShape.get(shape) ?? 0) + 1);
  }
  a.plan.blocks.forEach((b, k) => blocks.push([b.name, b.prefix.format(), b.algorithms.join(", "), String(nodesIn[k]!.size), String(locatorsIn[k]), String(sidsIn[k])]));
  out.push(blocks.toString());

  const counts = new Map<string, number>();
  for (const [shape, n] of byShape) {
    const behavior = p.behaviors[Math.floor(shape / flavorSets)]!;
    const flavors = p.flavorSets[shape % flavorSets]!;
    const k = flavors.length ? `${behavior} (${flavors.join("+")})` : behavior;
    counts.set(k, (counts.get(k) ?? 0) + n);
  }
  const beh = table(["behavior", "SIDs"]);
  for (const k of [...counts.keys()].sort()) beh.push([k, String(counts.get(k))]);
  out.push(beh.toString());

  const use = table(["level or pool", "used", "capacity", "use", "fullest at"]);
  for (const r of a.levelUsage) use.push([`level ${r.name}`, String(r.used), String(r.capacity), pct(r.used, r.capacity), r.fullest ?? ""]);
  for (const r of a.poolUsage) use.push([`pool ${r.name}`, String(r.used), String(r.capacity), pct(r.used, r.capacity), r.fullest ?? ""]);
  out.push(use.toString());
  return out.join("\n") + "\n";
}
