/** A row's codepoint is the one the IANA registry gives its behaviour and flavours. */
import { type Flavor, classifyCodepoint, codepointOf, isBehaviorName, parseFlavor } from "../../sid/behaviors.js";
import { Interner, SidGroups, nodeKeyOf, sidKinds, sidsOfKinds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const codepointMismatch: Rule = {
  meta: {
    id: "codepoint-mismatch",
    severity: "error",
    summary: "Advertise each SID with the codepoint of its own behaviour and flavours.",
    rationale:
      "The behaviour is not encoded in the SID's bits: the endpoint behaviour codepoint advertised beside the SID is all a headend or controller knows about it. A codepoint registered for another behaviour or flavour makes remote nodes use the SID for something it does not do (for example PSP where there is none).",
    source: "IANA SRv6 Endpoint Behaviors registry; RFC 8986 §10.2.2; RFC 9800 Table 1",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const kinds = sidKinds(ctx);
    // Per kind of SID, once: the id of `behaviour|flavours|codepoint` when the codepoint is another
    // behaviour's (-1: nothing to report), with the codepoint expected and the one found's meaning.
    const keys = new Interner();
    const expectedOf: number[] = [];
    const meansOf: string[] = [];
    const keyOf = Int32Array.from({ length: kinds.count }, (_, k) => {
      const cp = kinds.codepoint[k]!;
      const behavior = t.behaviors[kinds.behavior[k]!]!;
      if (Number.isNaN(cp) || !isBehaviorName(behavior)) return -1;
      const flavors: Flavor[] = [];
      for (const f of t.flavorSets[kinds.flavorSet[k]!]!) {
        const p = parseFlavor(f);
        if (!p) return -1; // flavor-illegal reports the unknown name
        flavors.push(p);
      }
      const expected = codepointOf(behavior, flavors);
      if (expected === undefined || expected === cp) return -1; // IANA SRv6 Endpoint Behaviors registry
      // Reserved, unassigned, private-use and opaque values have rules of their own.
      const c = classifyCodepoint(cp);
      let means: string;
      if (c.kind === "behavior") means = c.flavors.length ? `${c.behavior} with ${c.flavors.join("+")}` : c.behavior;
      else if (c.kind === "other-registered") means = c.name;
      else return -1;
      const id = keys.id(`${behavior}|${flavors.join("+")}|${cp}`);
      expectedOf[id] = expected;
      meansOf[id] = means;
      return id;
    });
    if (keyOf.every((k) => k < 0)) return;
    const groups = new SidGroups<number>(t);
    const nodes = t.nodeNames.length;
    for (const i of sidsOfKinds(kinds, Uint8Array.from(keyOf, (k) => (k >= 0 ? 1 : 0)))) {
      const k = keyOf[kinds.of[i]!]!;
      groups.add(k * nodes + nodeKeyOf(t, i), i, k);
    }
    for (const g of groups.ordered()) {
      const i = g.first;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const list = t.flavorSets[t.flavorSet[i]!]!;
      const flavors = list.join("+");
      const codepoint = t.codepoint[i]!;
      const sid = t.formatSid(i);
      const what = list.length ? `${behavior} with ${flavors}` : behavior;
      ctx.report({
        message: `${g.count} SID${g.count > 1 ? "s" : ""} of ${node} (e.g. ${sid}) are ${what} but carry codepoint ${codepoint}, which the registry gives to ${meansOf[g.data]!}; ${what} is ${expectedOf[g.data]!}`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint: `advertise codepoint ${expectedOf[g.data]!}, or correct the behaviour and flavours if the codepoint is the intended one`,
        data: { node, sid, behavior, flavors, codepoint, expected: expectedOf[g.data]!, means: meansOf[g.data]!, count: g.count },
      });
    }
  },
};
