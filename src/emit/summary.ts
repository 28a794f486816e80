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
  for (const b of a.plan.blocks) {
    const nodes = new Set<string>();
    let locators = 0;
    let sids = 0;
    for (const n of a.table.nodes) {
      const ls = n.locators.filter((l) => l.block === b.name);
      if (ls.length > 0) nodes.add(n.node);
      locators += ls.filter((l) => l.anycast === "").length;
      sids += n.sids.filter((s) => ls.some((l) => s.locator?.equals(l.prefix))).length;
    }
    blocks.push([b.name, b.prefix.format(), b.algorithms.join(", "), String(nodes.size), String(locators), String(sids)]);
  }
  out.push(blocks.toString());

  const counts = new Map<string, number>();
  for (const n of a.table.nodes) for (const s of n.sids) {
    const k = s.flavors.length ? `${s.behavior} (${s.flavors.join("+")})` : s.behavior;
    counts.set(k, (counts.get(k) ?? 0) + 1);
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
