// Reference copy (object views) of src/lint/rules/sid-outside-locator.ts as it was before the port to the packed table.
/** Every SID lies inside a locator of its own node with the same algorithm. */
import { formatAddr } from "../../../src/net/text.js";
import type { Rule } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export const sidOutsideLocator: Rule = {
  meta: RULES["sid-outside-locator"].meta,
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
