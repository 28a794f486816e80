/** Locators of different nodes must not overlap, unless the nodes share a declared anycast group. */
import { type PackedSidTable, maskWord } from "../../sid/packed.js";
import { leadMask } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const locatorOverlap: Rule = {
  meta: {
    id: "locator-overlap",
    severity: "error",
    summary: "Keep the locators of different nodes apart unless they are a declared anycast group.",
    rationale:
      "A locator routes to the node that owns it; two nodes advertising overlapping locators split or steal each other's traffic. Only anycast locators may be shared, and they must be flagged as anycast in the IGP.",
    source: "RFC 9352 §6; RFC 9513 §6; RFC 8986 §3.1",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const groupsOf = new Map<string, Set<string>>();
    for (const n of plan?.nodes ?? []) groupsOf.set(n.name, new Set(n.anycast));
    const shareAnycast = (a: string, b: string, la: string, lb: string) => {
      if (la !== "" && la === lb) return true;
      const ga = groupsOf.get(a);
      const gb = groupsOf.get(b);
      if (!ga || !gb) return false;
      for (const g of ga) if (gb.has(g)) return true;
      return false;
    };
    // Sweep in address order: keep the locators whose range is still open (a stack of nested
    // prefixes), so each locator is compared only with the prefixes that contain it. Prefixes
    // nest or are apart, so a locator is open while it contains the current one's first address.
    const { table: t, locatorOrder } = ctx.packed;
    const rank = t.nodeRank;
    const open: number[] = [];
    const seen = new Set<string>();
    const text: string[] = []; // per prefix id, made on first use
    const format = (p: number) => (text[p] ??= t.prefixes[p]!.format());
    for (const cur of locatorOrder) {
      const cp = t.locPrefix[cur]!;
      while (open.length > 0 && !holdsFirst(t, t.locPrefix[open[open.length - 1]!]!, cp)) open.pop();
      for (const o of open) {
        if (rank[t.locNode[o]!] === rank[t.locNode[cur]!]) continue;
        const oNode = t.nodeNames[t.locNode[o]!]!;
        const curNode = t.nodeNames[t.locNode[cur]!]!;
        if (shareAnycast(oNode, curNode, t.locatorEntry(o).anycast, t.locatorEntry(cur).anycast)) continue;
        const a = format(t.locPrefix[o]!);
        const b = format(cp);
        const key = `${oNode}|${curNode}|${a}|${b}`;
        if (seen.has(key)) continue;
        seen.add(key);
        ctx.report({
          message: a === b ? `nodes ${oNode} and ${curNode} both own locator ${a}` : `locator ${b} of ${curNode} lies inside locator ${a} of ${oNode}`,
          location: ctx.locateNode(curNode),
          objects: [oNode, curNode, a, b],
          hint: "give each node its own locator, or declare the nodes as members of one anycast group",
          data: { nodeA: oNode, nodeB: curNode, locatorA: a, locatorB: b },
        });
      }
      open.push(cur);
    }
  },
};

/** True when prefix p (host bits ignored) contains the first address of prefix q. */
function holdsFirst(t: PackedSidTable, p: number, q: number): boolean {
  const L = t.plen[p]!;
  const M = t.plen[q]!;
  return (
    ((maskWord(t.pw0[p]!, L) ^ maskWord(t.pw0[q]!, M)) & leadMask(L)) === 0 &&
    ((maskWord(t.pw1[p]!, L - 32) ^ maskWord(t.pw1[q]!, M - 32)) & leadMask(L - 32)) === 0 &&
    ((maskWord(t.pw2[p]!, L - 64) ^ maskWord(t.pw2[q]!, M - 64)) & leadMask(L - 64)) === 0 &&
    ((maskWord(t.pw3[p]!, L - 96) ^ maskWord(t.pw3[q]!, M - 96)) & leadMask(L - 96)) === 0
  );
}
