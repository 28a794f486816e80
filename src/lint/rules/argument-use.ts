/** Argument bits only on behaviours that take an argument: End.DT2M needs them, the others take none. */
import { BEHAVIORS, isBehaviorName } from "../../sid/behaviors.js";
import { type ScopeBlock, blockScope, csidFlavorCodes } from "../shared/csid.js";
import { SidGroups, sidKinds, sidsOfKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const argumentUse: Rule = {
  meta: {
    id: "argument-use",
    severity: "error",
    summary: "Give argument bits to End.DT2M and to no other uncompressed behaviour.",
    rationale:
      "Among the RFC 8986 behaviours only End.DT2M defines an argument (Arg.FE2, the split-horizon mapping for BUM flooding). A BGP receiver must check the argument length against the behaviour and ignores a SID that does not match; an End.DT2M without argument bits cannot carry split-horizon information. Compressed SIDs are exempt: they advertise the rest of the address as argument.",
    source: "RFC 8986 §4.12; RFC 9252 §3.2.1; RFC 9800 §8",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const codes = csidFlavorCodes(ctx);
    const kinds = sidKinds(ctx);
    // per kind of SID, judged once: 0 fine, 1 unexpected argument, 2 missing argument
    const FOUND = [undefined, "unexpected", "missing"] as const;
    const judged = Uint8Array.from({ length: kinds.count }, (_, k) => {
      const stId = kinds.structure[k]!;
      const b = t.behaviors[kinds.behavior[k]!]!;
      if (stId < 0 || !isBehaviorName(b)) return 0;
      if (codes[kinds.flavorSet[k]!] !== 0) return 0; // RFC 9800 §8: AL = 128 - LBL - LNL - FL
      const takes = BEHAVIORS[b].argument;
      const st = t.structures[stId]!;
      if (takes === "none" && st.argument > 0) return 1; // RFC 9252 §3.2.1: AL MUST be 0 without an argument
      if (takes === "required" && st.argument === 0) return 2; // RFC 8986 §4.12: Arg.FE2
      return 0;
    });
    if (judged.every((k) => k === 0)) return;
    const scopes = blockScope(ctx);
    const groups = new SidGroups<{ kind: "unexpected" | "missing"; block: ScopeBlock | undefined }>(t);
    for (const i of sidsOfKinds(kinds, judged.map((k) => (k === 0 ? 0 : 1)))) {
      const k = judged[kinds.of[i]!]!;
      const scope = scopes.of(i);
      const key = (t.behavior[i]! * 129 + t.structures[t.structure[i]!]!.argument) * scopes.count + scope;
      groups.add(key, i, { kind: FOUND[k]!, block: scopes.block(scope) });
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const argumentBits = t.structures[t.structure[i]!]!.argument;
      const sid = t.formatSid(i);
      const { kind, block } = g.data;
      const where = block ? `block ${block.name}` : node;
      const n = `${g.count} ${behavior} SID${g.count > 1 ? "s" : ""} of ${where} (e.g. ${sid})`;
      ctx.report({
        message:
          kind === "unexpected"
            ? `${n} have ${argumentBits} argument bits, but ${behavior} takes no argument; the argument length must be 0`
            : `${n} have no argument bits, but End.DT2M takes the Arg.FE2 argument`,
        location: block ? ctx.locatePlan(block.path) : ctx.locateSidAt(i),
        objects: block ? [block.name, node, sid] : [node, sid],
        hint:
          kind === "unexpected"
            ? "advertise the SID with argument length 0 (only End.DT2M and compressed SIDs carry an argument)"
            : block
              ? "give the block argument bits for End.DT2M (the argument key of its structure or compression)"
              : "advertise End.DT2M with the argument length its Arg.FE2 uses",
        data: { ...(block ? { block: block.name } : {}), node, sid, behavior, argumentBits, kind, count: g.count },
      });
    }
  },
};
