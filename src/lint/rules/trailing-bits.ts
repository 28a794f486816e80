/** Bits of a SID after its structure (block + node + function + argument) are zero. */
import { csidFlavorCodes } from "../shared/csid.js";
import { SidGroups, leadMask, nodeKeyOf, sidKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const trailingBits: Rule = {
  meta: {
    id: "trailing-bits",
    severity: "error",
    summary: "Leave every bit after a SID's block, node, function and argument at zero.",
    rationale:
      "When a SID uses fewer than 128 bits, the rest must be zero; a SID with stray low bits is not the SID its structure describes, and whoever builds SID lists from the structure will build another address. Compressed SIDs advertise the rest of the address as argument, and that argument must be zero in the advertised SID.",
    source: "RFC 8986 §3.1; RFC 9800 §8",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const codes = csidFlavorCodes(ctx);
    const kinds = sidKinds(ctx);
    // Per kind of SID, judged once: the bits the SID uses, or -1 when there is nothing to check.
    const usedOf = Int16Array.from({ length: kinds.count }, (_, k) => {
      const stId = kinds.structure[k]!;
      if (stId < 0) return -1;
      const st = t.structures[stId]!;
      const lf = st.block + st.node + st.function;
      if (lf + st.argument > 128) return -1; // structure-too-long reports it
      // RFC 9800 §8: a NEXT-CSID or REPLACE-CSID SID is advertised with the rest of the address as
      // argument (AL = 128 - LBL - LNL - FL) and all argument bits 0, so its bits after the function
      // must be zero whatever argument length the row states.
      const used = codes[kinds.flavorSet[k]!] !== 0 ? lf : lf + st.argument;
      return used < 128 ? used : -1;
    });
    if (usedOf.every((u) => u < 0)) return;
    // per kind and address word: the bits after `used`, which must be zero (none when nothing is checked)
    const [t0, t1, t2, t3] = [0, 32, 64, 96].map((w) => Int32Array.from(usedOf, (u) => (u < 0 ? 0 : ~leadMask(u - w)))) as [Int32Array, Int32Array, Int32Array, Int32Array];
    const { w0, w1, w2, w3 } = t;
    const of = kinds.of;
    const groups = new SidGroups<{ used: number; kind: "trailing" | "argument" }>(t, 3);
    const nodes = t.nodeNames.length;
    for (let i = 0; i < t.count; i++) {
      const k = of[i]!;
      if (((w0[i]! & t0[k]!) | (w1[i]! & t1[k]!) | (w2[i]! & t2[k]!) | (w3[i]! & t3[k]!)) === 0) continue; // RFC 8986 §3.1: bits after L+F+A MUST be 0
      const compressed = codes[t.flavorSet[i]!] !== 0 ? 1 : 0;
      groups.add((t.structure[i]! * 2 + compressed) * nodes + nodeKeyOf(t, i), i, { used: usedOf[k]!, kind: compressed ? "argument" : "trailing" });
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const sid = t.formatSid(i);
      const st = t.structures[t.structure[i]!]!;
      const { used, kind } = g.data;
      const examples = g.examples.map((e) => t.formatSid(e));
      ctx.report({
        message:
          kind === "trailing"
            ? `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (${examples.join(", ")}${g.count > examples.length ? ", ..." : ""}) have bits set after bit ${used} (block ${st.block} + node ${st.node} + function ${st.function} + argument ${st.argument}); those bits must be zero`
            : `${g.count} compressed SID${g.count > 1 ? "s" : ""} of ${node} (${examples.join(", ")}${g.count > examples.length ? ", ..." : ""}) have argument bits set after bit ${used} (block ${st.block} + node ${st.node} + function ${st.function}); an advertised compressed SID has argument 0`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint: kind === "trailing" ? "clear the low bits, or widen the function or argument in the structure if they are meant" : "advertise the SID with its argument bits cleared",
        data: { node, sid, kind, usedBits: used, count: g.count, examples: examples.join(",") },
      });
    }
  },
};
