// Reference copy (object views) of src/lint/rules/argument-use.ts as it was before the port to the packed table.
/** Argument bits only on behaviours that take an argument: End.DT2M needs them, the others take none. */
import { formatAddr } from "../../../src/net/text.js";
import { BEHAVIORS, isBehaviorName } from "../../../src/sid/behaviors.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { blockScope, csidFlavorOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const argumentUse: Rule = {
  meta: RULES["argument-use"].meta,
  check(ctx) {
    const scopeOf = blockScope(ctx);
    const groups = new Map<string, { first: OwnedSid; count: number; kind: "unexpected" | "missing"; block?: { name: string; index: number; path: (string | number)[] } }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      const b = s.entry.behavior;
      if (!st || !isBehaviorName(b)) continue;
      if (csidFlavorOf(s.entry.flavors) !== undefined) continue; // RFC 9800 §8: AL = 128 - LBL - LNL - FL
      const takes = BEHAVIORS[b].argument;
      let kind: "unexpected" | "missing";
      if (takes === "none" && st.argument > 0) kind = "unexpected"; // RFC 9252 §3.2.1: AL MUST be 0 without an argument
      else if (takes === "required" && st.argument === 0) kind = "missing"; // RFC 8986 §4.12: Arg.FE2
      else continue;
      const scope = scopeOf(s);
      const key = `${scope.key}|${b}|${st.argument}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, kind, block: scope.block });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const e = g.first.entry;
      const sid = formatAddr(e.sid);
      const where = g.block ? `block ${g.block.name}` : g.first.node;
      const n = `${g.count} ${e.behavior} SID${g.count > 1 ? "s" : ""} of ${where} (e.g. ${sid})`;
      ctx.report({
        message:
          g.kind === "unexpected"
            ? `${n} have ${e.structure!.argument} argument bits, but ${e.behavior} takes no argument; the argument length must be 0`
            : `${n} have no argument bits, but End.DT2M takes the Arg.FE2 argument`,
        location: g.block ? ctx.locatePlan(g.block.path) : ctx.locateSid(g.first),
        objects: g.block ? [g.block.name, g.first.node, sid] : [g.first.node, sid],
        hint:
          g.kind === "unexpected"
            ? "advertise the SID with argument length 0 (only End.DT2M and compressed SIDs carry an argument)"
            : g.block
              ? "give the block argument bits for End.DT2M (the argument key of its structure or compression)"
              : "advertise End.DT2M with the argument length its Arg.FE2 uses",
        data: { ...(g.block ? { block: g.block.name } : {}), node: g.first.node, sid, behavior: e.behavior, argumentBits: e.structure!.argument, kind: g.kind, count: g.count },
      });
    }
  },
};
