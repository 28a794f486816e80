/** Compressed SIDs use C-SIDs of 16 or 32 bits (the reading of C-SIDs is in ../shared/csid.ts). */
import { type ScopeBlock, blockScope, shapeOf } from "../shared/csid.js";
import { SidGroups, structureKeyIds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const csidLength: Rule = {
  meta: {
    id: "csid-length",
    severity: "error",
    summary: "Give compressed SIDs C-SIDs of 16 or 32 bits.",
    rationale:
      "RFC 9800 defines C-SID lengths of 16 and 32 bits only (NEXT-CSID must support a 32-bit block with 16-bit C-SIDs, REPLACE-CSID must support 32-bit C-SIDs). A source node cannot pack a C-SID of any other length into a container, so the SID is carried uncompressed or, worse, compressed wrongly by a node that guesses.",
    source: "RFC 9800 §4.1, §4.2, §6.1, §6.4, §8",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const shapes = shapeOf(ctx);
    if (!shapes.any) return;
    const scopes = blockScope(ctx);
    const bnf = structureKeyIds(t, (st) => `${st.block}/${st.node}/${st.function}`);
    const groups = new SidGroups<{ length: number; block: ScopeBlock | undefined }>(t);
    for (let i = 0; i < t.count; i++) {
      const v = shapes.at(i);
      if (!v) continue;
      const { flavor, shape } = v;
      if (shape.length === 16 || shape.length === 32) continue; // RFC 9800 §4.1, §4.2: 16 or 32 bits
      const scope = scopes.of(i);
      const key = (bnf[t.structure[i]!]! * 2 + (flavor === "NEXT-CSID" ? 0 : 1)) * scopes.count + scope;
      groups.add(key, i, { length: shape.length, block: scopes.block(scope) });
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const st = t.structures[t.structure[i]!]!;
      const flavor = shapes.at(g.lead)!.flavor;
      const { length, block } = g.data;
      const sid = t.formatSid(i);
      const where = block ? `block ${block.name}` : node;
      const reading =
        flavor === "NEXT-CSID"
          ? st.node === st.function
            ? `node ${st.node} + function ${st.function} bits read as one C-SID of ${length} bits (two C-SIDs of ${st.node} bits are not allowed either)`
            : `node ${st.node} + function ${st.function} bits make a C-SID of ${length} bits`
          : `node ${st.node} + function ${st.function} bits make a C-SID (LNFL) of ${length} bits`;
      ctx.report({
        message: `${g.count} ${flavor} SID${g.count > 1 ? "s" : ""} of ${where} (e.g. ${sid}): ${reading}; C-SIDs must be 16 or 32 bits`,
        location: block ? ctx.locatePlan(block.path) : ctx.locateSidAt(i),
        objects: block ? [block.name, node, sid] : [node, sid],
        hint:
          flavor === "NEXT-CSID"
            ? "use 16 or 32 node bits and either no function (global C-SID), a function of the same length (global + local C-SID), or node + function of 16 or 32 bits"
            : "use node + function of 16 or 32 bits, or node 16 + function 16 on a locator whose End SID has node 16 and no function (RFC 9800 §6.4)",
        data: { ...(block ? { block: block.name } : {}), node, sid, flavor, blockBits: st.block, nodeBits: st.node, functionBits: st.function, csidLength: length, count: g.count },
      });
    }
  },
};
