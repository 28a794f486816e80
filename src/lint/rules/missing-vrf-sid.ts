/** Every PE of a VRF has the VRF's decapsulation SID (End.DT4 / End.DT6 / End.DT46) in the table. */
import type { Rule } from "../types.js";
import { behaviorOf } from "../shared/behavior.js";

/** The behaviours that serve each family: a per-family table lookup, or the combined one. */
const SERVES = { ipv4: ["End.DT4", "End.DT46"], ipv6: ["End.DT6", "End.DT46"] } as const;
/** The decapsulation behaviours, in the order a SID is tested against them. */
const DECAP = ["End.DT4", "End.DT6", "End.DT46"] as const;

export const missingVrfSid: Rule = {
  meta: {
    id: "missing-vrf-sid",
    severity: "error",
    summary: "Give every PE of a VRF its per-VRF End.DT4, End.DT6 or End.DT46 SID.",
    rationale:
      "A remote PE sends VPN traffic to the egress PE's per-VRF service SID; a PE that lacks it for a family cannot decapsulate into the VRF, so the VPN is advertised but black-holes that family.",
    source: "RFC 9252 §5 (per-VRF service SIDs); RFC 8986 §4.6-4.8",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const { table: t, sidOrder } = ctx.packed;
    const inTable = new Set(t.nodeNames);
    const rank = t.nodeRank;
    const ranks = t.nodeNames.length; // more than the highest rank
    // Per VRF and node (name rank): the "behavior|algorithm" of its decapsulation SIDs, in the
    // order of ctx.sids (a message lists them). VRFs are numbered once per context id and each
    // "behavior|algorithm" text is made once, so a SID costs a few lookups.
    const vrfIds = new Map<string, number>();
    const vrfOfContext = new Int32Array(t.contextCount).fill(-2); // -2: not looked at yet, -1: no vrf
    const dt = new Map<number, string[]>(); // vrf id * ranks + rank
    const decap = behaviorOf(t, DECAP);
    const texts = DECAP.map(() => new Map<number, string>());
    for (let k = 0; k < sidOrder.length; k++) {
      const i = sidOrder[k]!;
      const d = decap(i);
      if (d < 0) continue;
      const c = t.context[i]!;
      let v = vrfOfContext[c]!;
      if (v === -2) {
        const name = t.contextOf(c)["vrf"];
        if (name !== undefined && !vrfIds.has(name)) vrfIds.set(name, vrfIds.size);
        v = vrfOfContext[c] = name === undefined ? -1 : vrfIds.get(name)!;
      }
      if (v < 0) continue;
      const a = t.algorithm[i]!;
      let text = texts[d]!.get(a);
      if (text === undefined) texts[d]!.set(a, (text = `${DECAP[d]}|${a}`));
      const k2 = v * ranks + rank[t.node[i]!]!;
      const list = dt.get(k2);
      if (!list) dt.set(k2, [text]);
      else if (!list.includes(text)) list.push(text);
    }
    const rankOf = new Map(t.nodeNames.map((n, id) => [n, rank[id]!]));
    plan.vrfs.forEach((v, i) => {
      const vrf = vrfIds.get(v.name);
      const serving = { ipv4: SERVES.ipv4.map((b) => `${b}|${v.algorithm}`), ipv6: SERVES.ipv6.map((b) => `${b}|${v.algorithm}`) };
      v.pes.forEach((pe, j) => {
        if (ctx.input.fromTable && !inTable.has(pe)) return; // PE not in the inventory yet
        const r = rankOf.get(pe);
        const have = (r !== undefined && vrf !== undefined && dt.get(vrf * ranks + r)) || [];
        const unserved = v.families.filter((f) => !serving[f].some((x) => have.includes(x)));
        if (unserved.length === 0) return;
        const expected = v.families.length === 2 && v.mode === "combined" ? ["End.DT46"] : unserved.map((f) => (f === "ipv4" ? "End.DT4" : "End.DT6"));
        const elsewhere = have.filter((x) => !x.endsWith(`|${v.algorithm}`));
        // RFC 9252 §5: the egress PE advertises a per-VRF End.DT4/End.DT6/End.DT46 service SID.
        ctx.report({
          message: `PE ${pe} has no ${expected.join(" or ")} SID for VRF ${v.name} (algorithm ${v.algorithm}), so ${unserved.join(" and ")} traffic of the VRF cannot be decapsulated there${elsewhere.length ? `; it has ${elsewhere.map((x) => x.replace("|", " under algorithm ")).join(", ")}` : ""}`,
          location: ctx.input.fromTable ? ctx.locateNode(pe) : ctx.locatePlan(["vrfs", i, "pes", j]),
          objects: [pe, v.name],
          hint: `add ${expected.join(" and ")} with context vrf=${v.name} on ${pe}`,
          data: { vrf: v.name, pe, missing: expected.join(","), families: unserved.join(","), algorithm: v.algorithm },
        });
      });
    });
  },
};
