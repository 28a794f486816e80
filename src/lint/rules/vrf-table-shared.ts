/**
 * No two VRFs decapsulate into one table on a node: each End.DT4 / End.DT6 / End.DT46 SID of a
 * node names the table of its own VRF.
 */
import type { Rule } from "../types.js";
import { behaviorOf } from "../shared/behavior.js";

/** The decapsulation behaviours whose context names a VRF and its table. */
const DECAP = ["End.DT4", "End.DT6", "End.DT46"] as const;

export const vrfTableShared: Rule = {
  meta: {
    id: "vrf-table-shared",
    severity: "error",
    summary: "Give each VRF on a node a table of its own: no two VRFs' End.DT4/End.DT6/End.DT46 SIDs may name one table.",
    rationale:
      "A decapsulation SID looks the inner packet up in the one table it is bound to. When the SIDs of two VRFs on a PE name the same table, traffic of one VPN is forwarded with the other's routes: the two customers are joined without anyone having meant it.",
    source: "RFC 8986 §4.6-4.8 (End.DT4/DT6/DT46 look up the table T bound to the SID); RFC 4364 §3 (one VRF per set of routes); one table per VRF is common practice",
    needs: "table",
  },
  check(ctx) {
    const { table: t, sidOrder } = ctx.packed;
    const decap = behaviorOf(t, DECAP);
    // per context id: [vrf, table] when the context names both, null otherwise (read once per id)
    const named: ([string, string] | null | undefined)[] = [];
    // node id -> table -> the first VRF seen on it, with its SID
    const seen = new Map<number, Map<string, { vrf: string; at: number }>>();
    const reported = new Set<string>();
    for (let k = 0; k < sidOrder.length; k++) {
      const i = sidOrder[k]!;
      if (decap(i) < 0) continue;
      const c = t.context[i]!;
      let vt = named[c];
      if (vt === undefined) {
        const ctxt = t.contextOf(c);
        const vrf = ctxt["vrf"];
        const table = ctxt["table"];
        vt = named[c] = vrf !== undefined && table !== undefined && vrf !== "" && table !== "" ? [vrf, table] : null;
      }
      if (vt === null) continue;
      const [vrf, table] = vt;
      const node = t.node[i]!;
      let tables = seen.get(node);
      if (!tables) seen.set(node, (tables = new Map()));
      const first = tables.get(table);
      if (!first) {
        tables.set(table, { vrf, at: i });
        continue;
      }
      if (first.vrf === vrf) continue; // one VRF's SIDs of several families or algorithms
      const name = t.nodeNames[node]!;
      const key = JSON.stringify([name, table, first.vrf, vrf]);
      if (reported.has(key)) continue;
      reported.add(key);
      ctx.report({
        message: `on ${name}, the SIDs of VRF ${first.vrf} (${t.formatSid(first.at)}) and VRF ${vrf} (${t.formatSid(i)}) both decapsulate into table ${table}, so the two VRFs' traffic is looked up in one set of routes`,
        location: ctx.locateSidAt(i),
        objects: [name, first.vrf, vrf],
        hint: `give VRF ${vrf} a table of its own on ${name}`,
        data: { node: name, table, vrf: first.vrf, other: vrf },
      });
    }
  },
};
