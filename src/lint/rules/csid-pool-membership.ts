/** Node C-SIDs come from the block's global pool (GIB), local C-SIDs from its local pool (LIB). */
import { getField } from "../../net/uint128.js";
import type { Block, ValueRange } from "../../plan/model.js";
import { formatRange, inRanges } from "../../plan/normalize.js";
import type { PackedSidTable } from "../../sid/packed.js";
import { Interner, PrefixMap, SidGroups, fieldAt, fieldIsZero, nodeKeyOf, sameLead } from "../shared/sids.js";
import type { Rule } from "../types.js";

type Role = "node" | "local" | "csid";

export const csidPoolMembership: Rule = {
  meta: {
    id: "csid-pool-membership",
    severity: "error",
    summary: "Take node C-SIDs from the block's global pool and local C-SIDs from its local pool.",
    rationale:
      "The pools are how a deployment keeps global C-SIDs (the same segment on every node) apart from local ones (a different segment on each node). A node C-SID outside the global pool can collide with a local C-SID elsewhere, and a local C-SID outside the local pool can shadow another node's global C-SID.",
    source: "RFC 9800 §5, §5.1, §5.2, §9.2",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const t = ctx.packed.table;
    // Compressed blocks by prefix length, then by leading bits: a SID finds its block in one
    // lookup per distinct block length (O(n) for a fixed plan).
    const byLen = new Map<number, PrefixMap<Block>>();
    for (const b of plan.blocks) {
      if (b.layout.kind !== "compressed") continue;
      let m = byLen.get(b.prefix.len);
      if (!m) byLen.set(b.prefix.len, (m = new PrefixMap(t)));
      m.setPrefix(b.prefix, b);
    }
    if (byLen.size === 0) return;
    const lengths = [...byLen.keys()].sort((a, b) => b - a); // longest match first
    const longest = lengths[0]!;
    // the block of a SID depends only on its first `longest` bits, which neighbours mostly share
    let last = -1;
    let lastBlock: Block | undefined;
    const blockOf = (i: number): Block | undefined => {
      if (last >= 0 && sameLead(t, i, last, longest)) return lastBlock;
      let block: Block | undefined;
      for (const len of lengths) {
        block = byLen.get(len)!.get(i, len);
        if (block) break;
      }
      last = i;
      lastBlock = block;
      return block;
    };
    const ROLES: readonly Role[] = ["node", "local", "csid"];
    const blockIds = new Interner();
    const nodes = t.nodeNames.length;
    const groups = new SidGroups<Role>(t, 3);
    const add = (i: number, block: Block, role: number) => groups.add((blockIds.id(block.name) * 3 + role) * nodes + nodeKeyOf(t, i), i, ROLES[role]!);
    for (let i = 0; i < t.count; i++) {
      const block = blockOf(i);
      if (!block || block.layout.kind !== "compressed") continue;
      const L = block.layout;
      if (L.twoCsid) {
        // Node C-SID from the GIB, function C-SID (when the SID has one) from the LIB. RFC 9800 §5.
        if (L.gib.length > 0 && !inPool(t, i, L.blockBits, L.nodeBits, L.gib)) add(i, block, 0);
        const st = t.structure[i]!;
        const hasLocal = st >= 0 ? t.structures[st]!.function > 0 : !fieldIsZero(t, i, L.blockBits + L.nodeBits, L.functionBits);
        if (hasLocal && L.lib.length > 0 && !inPool(t, i, L.blockBits + L.nodeBits, L.functionBits, L.lib)) add(i, block, 1);
      } else {
        // One C-SID holds node and function (REPLACE-CSID): it comes from the GIB. RFC 9800 §9.2.
        if (L.gib.length > 0 && !inPool(t, i, L.blockBits, L.csidBits, L.gib)) add(i, block, 2);
      }
    }
    for (const g of groups.ordered((a, b) => ROLES.indexOf(a.data) - ROLES.indexOf(b.data))) {
      const block = blockOf(g.lead)!; // the block and pool as the group's first SID in ctx.sids order found them
      const L = block.layout as Extract<Block["layout"], { kind: "compressed" }>;
      const role = g.data;
      const i = g.first;
      const node = t.nodeOf(i);
      const sid = t.formatSid(i);
      const examples = g.examples.map((e) => t.formatSid(e));
      const [offset, width] = role === "node" ? [L.blockBits, L.nodeBits] : role === "local" ? [L.blockBits + L.nodeBits, L.functionBits] : [L.blockBits, L.csidBits];
      const pool = (role === "local" ? L.lib : L.gib).map((r) => formatRange(r)).join(", ");
      const what = role === "node" ? "node C-SID" : role === "local" ? "local C-SID" : "C-SID";
      const poolName = role === "local" ? "local pool (LIB)" : "global pool (GIB)";
      const value = `0x${getField(t.sidAt(i), offset, width).toString(16)}`;
      ctx.report({
        message:
          role === "node"
            ? `${node} has the node C-SID ${value} in block ${block.name} (e.g. ${sid}), outside the ${poolName} ${pool}`
            : `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} in block ${block.name} (${examples.join(", ")}${g.count > examples.length ? ", ..." : ""}) have a ${what} outside the ${poolName} ${pool}, e.g. ${value}`,
        location: ctx.locateSidAt(i),
        objects: [block.name, node, sid],
        hint: role === "local" ? "take function values from the local pool, or widen the pool to cover them" : "give the node a value inside the global pool, or widen the pool to cover it",
        data: { block: block.name, node, sid, role, value, pool, count: g.count },
      });
    }
  },
};

/** Whether the `width`-bit field at `offset` of SID i lies in one of the ranges (inRanges on the field). */
function inPool(t: PackedSidTable, i: number, offset: number, width: number, rs: readonly ValueRange[]): boolean {
  if (width > 32) return inRanges(getField(t.sidAt(i), offset, width), rs);
  const v = fieldAt(t, i, offset, width);
  for (const r of rs) if (v >= r.first && v <= r.last) return true; // a number and a bigint compare exactly
  return false;
}
