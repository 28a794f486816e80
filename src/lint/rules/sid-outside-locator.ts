/** Every SID lies inside a locator of its own node with the same algorithm. */
import type { PackedSidTable } from "../../sid/packed.js";
import { inSidOrder, leadMask, prefixHolds } from "../shared/sids.js";
import type { Rule } from "../types.js";

export const sidOutsideLocator: Rule = {
  meta: {
    id: "sid-outside-locator",
    severity: "error",
    summary: "Allocate every SID from a locator of its own node and algorithm.",
    rationale:
      "Routers ignore an End or End.X SID that is not inside a locator the same node advertises for the same topology and algorithm, and the SID is unreachable: reachability comes only from the locator advertisement. A SID under a locator of another algorithm follows the wrong paths.",
    source: "RFC 9352 §7.2, §8; RFC 9513 §8, §9; RFC 8986 §3.3",
    needs: "table",
  },
  check(ctx) {
    const { table: t, locatorOrder } = ctx.packed;
    const rank = t.nodeRank;
    // the locators the views list (a SID may name one its node does not list)
    const listed = new Uint8Array(t.locatorCount);
    for (const id of locatorOrder) listed[id] = 1;
    // Nearly every SID lies in the locator it names, which its node lists with the SID's algorithm:
    // test that first, on words, and look at the node's other locators only for the rest.
    const rest = notInOwnLocator(t, listed);
    if (rest.length === 0) return;
    // each node's locators (by node name), in the order of ctx.locators
    const byNode = new Map<number, number[]>();
    for (const id of locatorOrder) {
      const k = rank[t.locNode[id]!]!;
      const list = byNode.get(k);
      if (list) list.push(id);
      else byNode.set(k, [id]);
    }
    const text = (id: number) => t.prefixes[t.locPrefix[id]!]!.format();
    for (const i of inSidOrder(t, rest)) {
      const locs = byNode.get(rank[t.node[i]!]!) ?? [];
      const containing = locs.filter((id) => prefixHolds(t, t.locPrefix[id]!, i));
      const algorithm = t.algorithm[i]!;
      if (containing.some((id) => t.locAlgorithm[id] === algorithm)) continue;
      const node = t.nodeOf(i);
      const behavior = t.behaviors[t.behavior[i]!]!;
      const addr = t.formatSid(i);
      if (containing.length > 0) {
        const l = containing[0]!;
        const locatorAlgorithm = t.locAlgorithm[l]!;
        ctx.report({
          message: `SID ${addr} (${behavior}, algorithm ${algorithm}) on ${node} lies under locator ${text(l)} of algorithm ${locatorAlgorithm}`,
          location: ctx.locateSidAt(i),
          objects: [node, addr, text(l)],
          hint: `allocate it from ${node}'s algorithm ${algorithm} locator`,
          data: { sid: addr, node, algorithm, locatorAlgorithm },
        });
      } else {
        ctx.report({
          message: `SID ${addr} (${behavior}) on ${node} is outside every locator of ${node}${locs.length ? ` (${locs.map(text).join(", ")})` : " (the node has no locator)"}`,
          location: ctx.locateSidAt(i),
          objects: [node, addr],
          hint: "take the SID from the node's locator, or add the locator the SID belongs to",
          data: { sid: addr, node },
        });
      }
    }
  },
};

/**
 * The SIDs that do not lie in the listed locator they name, of their node (id) and algorithm: the
 * ones to look at further. A SID that is left out would pass the full test too. Neighbours mostly
 * name one locator, so its masked words are kept.
 */
function notInOwnLocator(t: PackedSidTable, listed: Uint8Array): number[] {
  const rest: number[] = [];
  const { locator, algorithm, node, w0, w1, w2, w3, locPrefix, locAlgorithm, locNode, plen, pw0, pw1, pw2, pw3 } = t;
  const n = t.count;
  let last = -2;
  let la = -1; // algorithm and node of the locator at hand (-1: none, nothing passes)
  let ln = -1;
  let m0 = 0, m1 = 0, m2 = 0, m3 = 0; // prettier-ignore
  let p0 = 0, p1 = 0, p2 = 0, p3 = 0; // prettier-ignore
  for (let i = 0; i < n; i++) {
    const loc = locator[i]!;
    if (loc !== last) {
      last = loc;
      la = ln = -1;
      if (loc >= 0 && listed[loc] === 1) {
        const p = locPrefix[loc]!;
        const L = plen[p]!;
        la = locAlgorithm[loc]!;
        ln = locNode[loc]!;
        m0 = leadMask(L);
        m1 = leadMask(L - 32);
        m2 = leadMask(L - 64);
        m3 = leadMask(L - 96);
        p0 = pw0[p]! & m0;
        p1 = pw1[p]! & m1;
        p2 = pw2[p]! & m2;
        p3 = pw3[p]! & m3;
      }
    }
    if (node[i] === ln && algorithm[i] === la && (w0[i]! & m0) === p0 && (w1[i]! & m1) === p1 && (w2[i]! & m2) === p2 && (w3[i]! & m3) === p3) continue;
    rest.push(i);
  }
  return rest;
}
