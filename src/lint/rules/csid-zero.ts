/** No compressed SID uses the reserved C-SID value 0. */
import { shapeOf } from "../shared/csid.js";
import { SidGroups, fieldIsZero, nodeKeyOf } from "../shared/sids.js";
import type { Rule } from "../types.js";

type Role = "node" | "local" | "csid";

export const csidZero: Rule = {
  meta: {
    id: "csid-zero",
    severity: "error",
    summary: "Never give a node or local C-SID the value 0.",
    rationale:
      "C-SID value 0 is reserved: it marks the end of a C-SID container. A node C-SID of 0, or a local C-SID of 0, makes a source node that packs the SID end the container early, so the packet stops at the wrong node or is dropped.",
    source: "RFC 9800 §5, §4.2",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const shapes = shapeOf(ctx);
    if (!shapes.any) return;
    const ROLES: readonly Role[] = ["node", "local", "csid"];
    const groups = new SidGroups<Role>(t, 3);
    const nodes = t.nodeNames.length;
    const add = (i: number, role: number) => groups.add(role * nodes + nodeKeyOf(t, i), i, ROLES[role]!);
    for (let i = 0; i < t.count; i++) {
      const v = shapes.at(i);
      if (!v) continue;
      const { st, shape } = v;
      if (shape.kind === "two") {
        // Global (node) C-SID, then the local C-SID in the function field. RFC 9800 §5: 0 is reserved.
        if (fieldIsZero(t, i, st.block, shape.length)) add(i, 0);
        if (fieldIsZero(t, i, st.block + shape.length, shape.length)) add(i, 1);
      } else if (shape.length > 0 && fieldIsZero(t, i, st.block, shape.length)) {
        // One C-SID: the node C-SID alone (function 0), the local C-SID alone (node 0), or both in one.
        add(i, st.function === 0 ? 0 : st.node === 0 ? 1 : 2);
      }
    }
    for (const g of groups.ordered((a, b) => ROLES.indexOf(a.data) - ROLES.indexOf(b.data))) {
      const i = g.first;
      const node = t.nodeOf(i);
      const sid = t.formatSid(i);
      const role = g.data;
      const examples = g.examples.map((e) => t.formatSid(e));
      const what = role === "node" ? "node C-SID" : role === "local" ? "local C-SID" : "C-SID";
      ctx.report({
        message: `${g.count} compressed SID${g.count > 1 ? "s" : ""} of ${node} (${examples.join(", ")}${g.count > examples.length ? ", ..." : ""}) have the ${what} value 0, which is reserved to end a C-SID container`,
        location: ctx.locateSidAt(i),
        objects: [node, sid],
        hint: role === "local" ? "take the function (local C-SID) from the local pool, which never holds 0" : "give the node a non-zero value from the global pool",
        data: { node, sid, role, count: g.count, examples: examples.join(",") },
      });
    }
  },
};
