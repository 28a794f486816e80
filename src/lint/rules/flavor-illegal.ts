/** Flavours are known names, and legal for the behaviour they are given to. */
import { type BehaviorName, type Flavor, FLAVOR_ORDER, flavorProblem, isBehaviorName, normalizeFlavors, parseFlavor } from "../../sid/behaviors.js";
import { Interner, SidGroups, nodeKeyOf, sidKinds, sidsOfKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const flavorIllegal: Rule = {
  meta: {
    id: "flavor-illegal",
    severity: "error",
    summary: "Use only registered flavour names, and only on behaviours the registry gives them to.",
    rationale:
      "PSP, USP and USD are variants of End, End.X and End.T only; NEXT-CSID and REPLACE-CSID exist for the behaviours RFC 9800 lists, never together. A flavour the behaviour does not have has no codepoint, so the router either refuses the SID or advertises something other than what the plan says.",
    source: "RFC 8986 §4.16; RFC 9800 §4, §10; IANA SRv6 Endpoint Behaviors registry",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    // Per flavour set, once: the names no spelling reads, and the flavours read.
    const unknownOf: string[][] = [];
    const parsedOf: Flavor[][] = [];
    for (const list of t.flavorSets) {
      const parsed: Flavor[] = [];
      const unknown: string[] = [];
      for (const f of list) {
        const p = parseFlavor(f);
        if (p) parsed.push(p);
        else unknown.push(f);
      }
      unknownOf.push(unknown);
      parsedOf.push(parsed);
    }
    // Per kind of SID, once: the id of the finding's key without the node (-1: no finding).
    const kinds = sidKinds(ctx);
    const keys = new Interner();
    const keyOf = Int32Array.from({ length: kinds.count }, (_, k) => {
      const bid = kinds.behavior[k]!;
      const fid = kinds.flavorSet[k]!;
      if (t.flavorSets[fid]!.length === 0) return -1;
      const unknown = unknownOf[fid]!;
      if (unknown.length > 0) return keys.id(`unknown|${unknown.join("+")}`);
      const behavior = t.behaviors[bid]!;
      if (!isBehaviorName(behavior)) return -1; // behavior-unknown reports the name
      if (flavorProblem(behavior, parsedOf[fid]!) === undefined) return -1; // RFC 8986 §4.16; RFC 9800 §4; IANA registry
      return keys.id(`${behavior}|${normalizeFlavors(parsedOf[fid]!).join("+")}`);
    });
    if (keyOf.every((k) => k < 0)) return;
    const groups = new SidGroups(t);
    const nodes = t.nodeNames.length;
    for (const i of sidsOfKinds(kinds, Uint8Array.from(keyOf, (k) => (k >= 0 ? 1 : 0)))) groups.add(keyOf[kinds.of[i]!]! * nodes + nodeKeyOf(t, i), i, undefined);
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const sid = t.formatSid(i);
      const flavors = t.flavorSets[t.flavorSet[i]!]!.join("+");
      // the unknown names and the problem as the group's first SID in ctx.sids order gave them
      const unknown = unknownOf[t.flavorSet[g.lead]!]!;
      const problem = unknown.length > 0 ? undefined : flavorProblem(t.behaviors[t.behavior[g.lead]!]! as BehaviorName, parsedOf[t.flavorSet[g.lead]!]!);
      const n = `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (e.g. ${sid}, ${behavior} with ${flavors})`;
      ctx.report({
        message: unknown.length > 0 ? `${n}: unknown flavour ${unknown.map((u) => JSON.stringify(u)).join(", ")}; known flavours: ${FLAVOR_ORDER.join(", ")}` : `${n}: ${problem}`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint: unknown.length > 0 ? "write flavours as PSP, USP, USD, NEXT-CSID or REPLACE-CSID, joined with +" : "drop the flavours the behaviour does not have, or use a behaviour that has them",
        data: { node, sid, behavior, flavors, kind: unknown.length > 0 ? "unknown-flavor" : "illegal", ...(unknown.length > 0 ? { unknown: unknown.join("+") } : {}), count: g.count },
      });
    }
  },
};
