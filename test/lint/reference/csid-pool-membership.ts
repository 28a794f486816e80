// Reference copy (object views) of src/lint/rules/csid-pool-membership.ts as it was before the port to the packed table.
/** Node C-SIDs come from the block's global pool (GIB), local C-SIDs from its local pool (LIB). */
import { formatAddr } from "../../../src/net/text.js";
import { getField, prefixMask } from "../../../src/net/uint128.js";
import type { Block, ValueRange } from "../../../src/plan/model.js";
import { formatRange, inRanges } from "../../../src/plan/normalize.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

type Role = "node" | "local" | "csid";

export const csidPoolMembership: Rule = {
  meta: RULES["csid-pool-membership"].meta,
  check(ctx) {
    const plan = ctx.input.plan!;
    // Compressed blocks by prefix length, then by first address: a SID finds its block in one
    // lookup per distinct block length (O(n) for a fixed plan).
    const byLen = new Map<number, Map<bigint, Block>>();
    for (const b of plan.blocks) {
      if (b.layout.kind !== "compressed") continue;
      let m = byLen.get(b.prefix.len);
      if (!m) byLen.set(b.prefix.len, (m = new Map()));
      m.set(b.prefix.first, b);
    }
    if (byLen.size === 0) return;
    const lengths = [...byLen.keys()].sort((a, b) => b - a); // longest match first
    const groups = new Map<string, { first: OwnedSid; count: number; block: Block; role: Role; value: bigint; pool: readonly ValueRange[]; examples: string[] }>();
    const add = (s: OwnedSid, block: Block, role: Role, value: bigint, pool: readonly ValueRange[]) => {
      const key = `${block.name}|${s.node}|${role}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, block, role, value, pool, examples: [formatAddr(s.entry.sid)] });
      else {
        g.count++;
        if (g.examples.length < 3) g.examples.push(formatAddr(s.entry.sid));
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) {
          g.first = s;
          g.value = value;
        }
      }
    };
    for (const s of ctx.sids) {
      const sid = s.entry.sid;
      let block: Block | undefined;
      for (const len of lengths) {
        block = byLen.get(len)!.get(sid & prefixMask(len));
        if (block) break;
      }
      if (!block || block.layout.kind !== "compressed") continue;
      const L = block.layout;
      if (L.twoCsid) {
        // Node C-SID from the GIB, function C-SID (when the SID has one) from the LIB. RFC 9800 §5.
        const nodeCsid = getField(sid, L.blockBits, L.nodeBits);
        if (L.gib.length > 0 && !inRanges(nodeCsid, L.gib)) add(s, block, "node", nodeCsid, L.gib);
        const local = getField(sid, L.blockBits + L.nodeBits, L.functionBits);
        const hasLocal = s.entry.structure ? s.entry.structure.function > 0 : local !== 0n;
        if (hasLocal && L.lib.length > 0 && !inRanges(local, L.lib)) add(s, block, "local", local, L.lib);
      } else {
        // One C-SID holds node and function (REPLACE-CSID): it comes from the GIB. RFC 9800 §9.2.
        const csid = getField(sid, L.blockBits, L.csidBits);
        if (L.gib.length > 0 && !inRanges(csid, L.gib)) add(s, block, "csid", csid, L.gib);
      }
    }
    for (const g of groups.values()) {
      const sid = formatAddr(g.first.entry.sid);
      const pool = g.pool.map((r) => formatRange(r)).join(", ");
      const what = g.role === "node" ? "node C-SID" : g.role === "local" ? "local C-SID" : "C-SID";
      const poolName = g.role === "local" ? "local pool (LIB)" : "global pool (GIB)";
      const value = `0x${g.value.toString(16)}`;
      ctx.report({
        message:
          g.role === "node"
            ? `${g.first.node} has the node C-SID ${value} in block ${g.block.name} (e.g. ${sid}), outside the ${poolName} ${pool}`
            : `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} in block ${g.block.name} (${g.examples.join(", ")}${g.count > g.examples.length ? ", ..." : ""}) have a ${what} outside the ${poolName} ${pool}, e.g. ${value}`,
        location: ctx.locateSid(g.first),
        objects: [g.block.name, g.first.node, sid],
        hint: g.role === "local" ? "take function values from the local pool, or widen the pool to cover them" : "give the node a value inside the global pool, or widen the pool to cover it",
        data: { block: g.block.name, node: g.first.node, sid, role: g.role, value, pool, count: g.count },
      });
    }
  },
};
