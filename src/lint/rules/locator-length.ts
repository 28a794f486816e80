/** A SID's locator is as long as the block and node bits of its structure. */
import { SidGroups, nodeKeyOf } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const locatorLength: Rule = {
  meta: {
    id: "locator-length",
    severity: "error",
    summary: "Make each locator exactly as long as the block plus node bits of its SIDs.",
    rationale:
      "The locator is the block followed by the node (L = LB + LN). A locator advertised at another length than the SID structure states either covers other nodes' SIDs or leaves part of the node's own SIDs unrouted, and the structure no longer describes the SID.",
    source: "RFC 8986 §3.1; RFC 9352 §9; RFC 9800 §2",
    needs: "table",
  },
  check(ctx) {
    // One finding per node, locator and stated block + node length.
    const t = ctx.packed.table;
    const blockNode = Int32Array.from(t.structures, (st) => st.block + st.node);
    const groups = new SidGroups(t);
    const nodes = t.nodeNames.length;
    const keys = new Map<number, number>(); // prefix id and block/node lengths -> a small id
    const { structure, locator } = t;
    let last = -1; // neighbours mostly name one locator: its length is kept
    let len = -1;
    for (let i = 0; i < t.count; i++) {
      const st = structure[i]!;
      const loc = locator[i]!;
      if (st < 0 || loc < 0) continue;
      if (loc !== last) {
        last = loc;
        len = t.plen[t.locPrefix[loc]!]!;
      }
      if (len === blockNode[st]) continue; // RFC 8986 §3.1: L = LB + LN
      const p = t.locPrefix[loc]!;
      const s = t.structures[st]!;
      const k = (p * 129 + s.block) * 129 + s.node;
      let id = keys.get(k);
      if (id === undefined) keys.set(k, (id = keys.size));
      groups.add(id * nodes + nodeKeyOf(t, i), i, undefined);
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const st = t.structures[t.structure[i]!]!;
      const prefix = t.prefixes[t.locPrefix[t.locator[i]!]!]!;
      const loc = prefix.format();
      const sid = t.formatSid(i);
      const expected = st.block + st.node;
      ctx.report({
        message: `locator ${loc} of ${node} is /${prefix.len}, but ${g.count} of its SID${g.count > 1 ? "s" : ""} (e.g. ${sid}) state block ${st.block} + node ${st.node} = ${expected} bits`,
        location: ctx.locateSidAt(i),
        objects: [node, loc],
        hint: `advertise the locator as /${expected}, or correct the block and node lengths of the SID structure`,
        data: { node, locator: loc, locatorLength: prefix.len, blockBits: st.block, nodeBits: st.node, expected, sid, count: g.count },
      });
    }
  },
};
