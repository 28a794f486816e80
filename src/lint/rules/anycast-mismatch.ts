/** All nodes sharing an anycast locator instantiate the same SIDs under it. */
import type { PackedSidTable } from "../../sid/packed.js";
import type { Rule } from "../types.js";
import { locatorGroups, sidsByNode, sidsOfNodeIn } from "../shared/locators.js";

/** What must be equal across members: the address and what it does (behaviour, flavours, algorithm). */
const signature = (t: PackedSidTable, i: number) => {
  const flavors = t.flavorSets[t.flavorSet[i]!]!;
  return `${t.formatSid(i)} ${t.behaviors[t.behavior[i]!]}${flavors.length ? "+" + [...flavors].sort().join("+") : ""} a${t.algorithm[i]}`;
};

export const anycastMismatch: Rule = {
  meta: {
    id: "anycast-mismatch",
    severity: "error",
    summary: "Give every member of an anycast locator the same SIDs under it.",
    rationale:
      "Traffic to an anycast locator reaches whichever member is closest. A SID that only some members instantiate is dropped, or runs another behaviour, depending on where the packet enters; which member answers changes with every topology change.",
    source: "RFC 9352 §6; RFC 9513 §6 (all nodes sharing an anycast locator MUST instantiate the same SIDs)",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const planNode = new Map(plan?.nodes.map((n) => [n.name, n]) ?? []);
    const groupIndex = new Map(plan?.anycast.map((a, i) => [a.name, i]) ?? []);
    const t = ctx.packed.table;
    const inTable = new Set(t.nodeNames);
    // SIDs per node in address order, for range queries.
    const byNode = sidsByNode(ctx);

    for (const g of locatorGroups(ctx)) {
      const holders = g.nodes;
      // The plan anycast group of this locator: named on the locator (plan, JSON tables), or the
      // group that at least one holder of a shared locator belongs to.
      let group = g.anycast !== "" ? g.anycast : undefined;
      if (group === undefined && holders.length > 1) group = plan?.anycast.find((a) => holders.some((h) => a.members.includes(h)))?.name;
      if (holders.length < 2 && group === undefined) continue; // a node-specific locator
      const members = new Set(holders);
      const decl = group === undefined ? undefined : plan?.anycast.find((a) => a.name === group);
      // Declared members present in the table that serve the locator's algorithm must hold it too.
      for (const m of decl?.members ?? []) {
        if (inTable.has(m) && (planNode.get(m)?.algorithms ?? [g.algorithm]).includes(g.algorithm)) members.add(m);
      }
      if (members.size < 2) continue;
      const sets = new Map<string, { sids: number[]; sigs: Set<string> }>();
      const union = new Set<string>();
      for (const m of [...members].sort()) {
        const sids = sidsOfNodeIn(t, byNode, m, g.range);
        const sigs = new Set(sids.map((i) => signature(t, i)));
        sets.set(m, { sids, sigs });
        for (const x of sigs) union.add(x);
      }
      const short: { node: string; missing: string[] }[] = [];
      for (const [m, { sigs }] of sets) {
        const missing = [...union].filter((k) => !sigs.has(k));
        if (missing.length > 0) short.push({ node: m, missing });
      }
      if (short.length === 0) continue;
      const loc = g.prefix.format();
      const total = short.reduce((n, s) => n + s.missing.length, 0);
      const first = short[0]!;
      // Locate at the member that lacks something: its first SID under the locator, or the node.
      const firstSid = sets.get(first.node)!.sids[0];
      const location =
        !ctx.input.fromTable && group !== undefined && groupIndex.has(group)
          ? ctx.locatePlan(["anycast", groupIndex.get(group)!])
          : firstSid !== undefined
            ? ctx.locateSidAt(firstSid)
            : ctx.locateNode(first.node);
      const detail = short
        .slice(0, 3)
        .map((s) => `${s.node} lacks ${s.missing.length} (${s.missing.slice(0, 2).join(", ")}${s.missing.length > 2 ? ", ..." : ""})`)
        .join("; ");
      // RFC 9352 §6, RFC 9513 §6: identical SIDs on every node sharing the anycast locator.
      ctx.report({
        message: `members of anycast locator ${loc}${group ? ` (group ${group})` : ""} carry different SIDs under it: ${detail}${short.length > 3 ? `; and ${short.length - 3} more members` : ""}`,
        location,
        objects: [loc, ...short.map((s) => s.node), ...(group ? [group] : [])],
        hint: "instantiate the same SIDs (address, behaviour, flavours) on every member, or give the odd member a node-specific locator for them",
        data: { locator: loc, algorithm: g.algorithm, members: members.size, differing: short.length, missing: total, ...(group ? { group } : {}) },
      });
    }
  },
};
