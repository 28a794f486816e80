/** Every PE of a VRF has the VRF's decapsulation SID (End.DT4 / End.DT6 / End.DT46) in the table. */
import type { Rule } from "../types.js";
import { isBehavior } from "./missing-end.js";

/** The behaviours that serve each family: a per-family table lookup, or the combined one. */
const SERVES = { ipv4: ["End.DT4", "End.DT46"], ipv6: ["End.DT6", "End.DT46"] } as const;

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
    const inTable = new Set(ctx.input.table.nodes.map((n) => n.node));
    // node|vrf -> "behavior|algorithm" of its decapsulation SIDs
    const dt = new Map<string, Set<string>>();
    for (const s of ctx.sids) {
      const vrf = s.entry.context["vrf"];
      if (vrf === undefined) continue;
      const b = ["End.DT4", "End.DT6", "End.DT46"].find((x) => isBehavior(s, x));
      if (!b) continue;
      const k = `${s.node}|${vrf}`;
      const set = dt.get(k) ?? new Set<string>();
      set.add(`${b}|${s.entry.algorithm}`);
      dt.set(k, set);
    }
    plan.vrfs.forEach((v, i) => {
      v.pes.forEach((pe, j) => {
        if (ctx.input.fromTable && !inTable.has(pe)) return; // PE not in the inventory yet
        const have = dt.get(`${pe}|${v.name}`) ?? new Set<string>();
        const unserved = v.families.filter((f) => !SERVES[f].some((b) => have.has(`${b}|${v.algorithm}`)));
        if (unserved.length === 0) return;
        const expected = v.families.length === 2 && v.mode === "combined" ? ["End.DT46"] : unserved.map((f) => (f === "ipv4" ? "End.DT4" : "End.DT6"));
        const elsewhere = [...have].filter((x) => !x.endsWith(`|${v.algorithm}`));
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
