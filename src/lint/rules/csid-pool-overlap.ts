/** The global (GIB) and local (LIB) C-SID pools of a compressed block do not overlap. */
import type { ValueRange } from "../../plan/model.js";
import { formatRange } from "../../plan/normalize.js";
import type { Rule } from "../types.js";

/** Sorted, merged copy of a list of ranges. */
function merged(rs: readonly ValueRange[]): ValueRange[] {
  const sorted = [...rs].sort((a, b) => (a.first < b.first ? -1 : a.first > b.first ? 1 : 0));
  const out: { first: bigint; last: bigint }[] = [];
  for (const r of sorted) {
    const top = out[out.length - 1];
    if (top && r.first <= top.last + 1n) {
      if (r.last > top.last) top.last = r.last;
    } else out.push({ first: r.first, last: r.last });
  }
  return out;
}

export const csidPoolOverlap: Rule = {
  meta: {
    id: "csid-pool-overlap",
    severity: "error",
    summary: "Keep a compressed block's global and local C-SID pools apart.",
    rationale:
      "A global C-SID means the same segment on every node of the block, a local C-SID means something different on each node. A value in both pools can be one node's global C-SID and another node's adjacency at once, so packets meant for one are taken by the other.",
    source: "RFC 9800 §5 (GIB and LIB are non-overlapping), §5.1, §5.2",
    needs: "plan",
  },
  check(ctx) {
    for (const b of ctx.input.plan!.blocks) {
      const L = b.layout;
      if (L.kind !== "compressed" || L.gib.length === 0 || L.lib.length === 0) continue;
      // Intersect the merged pools with two cursors: O(r log r) for r ranges.
      const g = merged(L.gib);
      const l = merged(L.lib);
      let i = 0;
      let j = 0;
      let shared = 0n;
      let firstShared: bigint | undefined;
      while (i < g.length && j < l.length) {
        const a = g[i]!;
        const c = l[j]!;
        const lo = a.first > c.first ? a.first : c.first;
        const hi = a.last < c.last ? a.last : c.last;
        if (lo <= hi) {
          // RFC 9800 §5: the GIB and the LIB do not overlap.
          shared += hi - lo + 1n;
          if (firstShared === undefined) firstShared = lo;
        }
        if (a.last < c.last) i++;
        else j++;
      }
      if (firstShared === undefined) continue;
      const v = firstShared;
      const gi = L.gib.findIndex((r) => r.first <= v && v <= r.last);
      const li = L.lib.findIndex((r) => r.first <= v && v <= r.last);
      const gib = formatRange(L.gib[gi]!);
      const lib = formatRange(L.lib[li]!);
      ctx.report({
        message: `block ${b.name}: global pool range ${gib} and local pool range ${lib} overlap; ${shared} C-SID value${shared === 1n ? " is" : "s are"} in both pools, the first 0x${v.toString(16)}`,
        location: ctx.locatePlan(["blocks", b.index, "compression", "local-pool", li]),
        objects: [b.name],
        hint: "split the C-SID space into two disjoint pools, e.g. node C-SIDs low and local C-SIDs at the top",
        data: { block: b.name, gib, lib, first: `0x${v.toString(16)}`, shared: Number(shared) },
      });
    }
  },
};
