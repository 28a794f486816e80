// Reference copy (object views) of src/lint/rules/sid-outside-locator.ts as it was before the port to the packed table.
/** Every SID lies inside a locator of its own node with the same algorithm. */
import { formatAddr } from "../../../src/net/text.js";
import type { Rule } from "../../../src/lint/types.js";

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
    const byNode = new Map<string, typeof ctx.locators[number][]>();
    for (const l of ctx.locators) {
      const list = byNode.get(l.node) ?? [];
      list.push(l);
      byNode.set(l.node, list);
    }
    for (const s of ctx.sids) {
      const locs = byNode.get(s.node) ?? [];
      const containing = locs.filter((l) => l.entry.prefix.contains(s.entry.sid));
      if (containing.some((l) => l.entry.algorithm === s.entry.algorithm)) continue;
      const addr = formatAddr(s.entry.sid);
      if (containing.length > 0) {
        const l = containing[0]!;
        ctx.report({
          message: `SID ${addr} (${s.entry.behavior}, algorithm ${s.entry.algorithm}) on ${s.node} lies under locator ${l.entry.prefix.format()} of algorithm ${l.entry.algorithm}`,
          location: ctx.locateSid(s),
          objects: [s.node, addr, l.entry.prefix.format()],
          hint: `allocate it from ${s.node}'s algorithm ${s.entry.algorithm} locator`,
          data: { sid: addr, node: s.node, algorithm: s.entry.algorithm, locatorAlgorithm: l.entry.algorithm },
        });
      } else {
        ctx.report({
          message: `SID ${addr} (${s.entry.behavior}) on ${s.node} is outside every locator of ${s.node}${locs.length ? ` (${locs.map((l) => l.entry.prefix.format()).join(", ")})` : " (the node has no locator)"}`,
          location: ctx.locateSid(s),
          objects: [s.node, addr],
          hint: "take the SID from the node's locator, or add the locator the SID belongs to",
          data: { sid: addr, node: s.node },
        });
      }
    }
  },
};
