// Reference copy (object views) of src/lint/rules/trailing-bits.ts as it was before the port to the packed table.
/** Bits of a SID after its structure (block + node + function + argument) are zero. */
import { formatAddr } from "../../../src/net/text.js";
import { hostMask } from "../../../src/net/uint128.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { csidFlavorOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const trailingBits: Rule = {
  meta: RULES["trailing-bits"].meta,
  check(ctx) {
    const groups = new Map<string, { first: OwnedSid; count: number; used: number; kind: "trailing" | "argument"; examples: string[] }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      if (!st) continue;
      const lf = st.block + st.node + st.function;
      if (lf + st.argument > 128) continue; // structure-too-long reports it
      // RFC 9800 §8: a NEXT-CSID or REPLACE-CSID SID is advertised with the rest of the address as
      // argument (AL = 128 - LBL - LNL - FL) and all argument bits 0, so its bits after the function
      // must be zero whatever argument length the row states.
      const compressed = csidFlavorOf(s.entry.flavors) !== undefined;
      const used = compressed ? lf : lf + st.argument;
      if (used >= 128 || (s.entry.sid & hostMask(used)) === 0n) continue; // RFC 8986 §3.1: bits after L+F+A MUST be 0
      const kind = compressed ? "argument" : "trailing";
      const key = `${s.node}|${st.block}/${st.node}/${st.function}/${st.argument}|${kind}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, used, kind, examples: [formatAddr(s.entry.sid)] });
      else {
        g.count++;
        if (g.examples.length < 3) g.examples.push(formatAddr(s.entry.sid));
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const sid = formatAddr(g.first.entry.sid);
      const st = g.first.entry.structure!;
      ctx.report({
        message:
          g.kind === "trailing"
            ? `${g.count} SID${g.count > 1 ? "s" : ""} of ${g.first.node} (${g.examples.join(", ")}${g.count > g.examples.length ? ", ..." : ""}) have bits set after bit ${g.used} (block ${st.block} + node ${st.node} + function ${st.function} + argument ${st.argument}); those bits must be zero`
            : `${g.count} compressed SID${g.count > 1 ? "s" : ""} of ${g.first.node} (${g.examples.join(", ")}${g.count > g.examples.length ? ", ..." : ""}) have argument bits set after bit ${g.used} (block ${st.block} + node ${st.node} + function ${st.function}); an advertised compressed SID has argument 0`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: g.kind === "trailing" ? "clear the low bits, or widen the function or argument in the structure if they are meant" : "advertise the SID with its argument bits cleared",
        data: { node: g.first.node, sid, kind: g.kind, usedBits: g.used, count: g.count, examples: g.examples.join(",") },
      });
    }
  },
};
