// Reference copy (object views) of src/lint/rules/csid-zero.ts as it was before the port to the packed table.
/** No compressed SID uses the reserved C-SID value 0. */
import { formatAddr } from "../../../src/net/text.js";
import { getField } from "../../../src/net/uint128.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { replace16Locators, shapeOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";

type Role = "node" | "local" | "csid";

export const csidZero: Rule = {
  meta: RULES["csid-zero"].meta,
  check(ctx) {
    const r16 = replace16Locators(ctx.sids);
    const groups = new Map<string, { first: OwnedSid; count: number; role: Role; examples: string[] }>();
    const add = (s: OwnedSid, role: Role) => {
      const key = `${s.node}|${role}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, role, examples: [formatAddr(s.entry.sid)] });
      else {
        g.count++;
        if (g.examples.length < 3) g.examples.push(formatAddr(s.entry.sid));
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    };
    for (const s of ctx.sids) {
      const v = shapeOf(s, r16);
      if (!v) continue;
      const { st, shape } = v;
      const sid = s.entry.sid;
      if (shape.kind === "two") {
        // Global (node) C-SID, then the local C-SID in the function field. RFC 9800 §5: 0 is reserved.
        if (getField(sid, st.block, shape.length) === 0n) add(s, "node");
        if (getField(sid, st.block + shape.length, shape.length) === 0n) add(s, "local");
      } else if (shape.length > 0 && getField(sid, st.block, shape.length) === 0n) {
        // One C-SID: the node C-SID alone (function 0), the local C-SID alone (node 0), or both in one.
        add(s, st.function === 0 ? "node" : st.node === 0 ? "local" : "csid");
      }
    }
    for (const g of groups.values()) {
      const sid = formatAddr(g.first.entry.sid);
      const what = g.role === "node" ? "node C-SID" : g.role === "local" ? "local C-SID" : "C-SID";
      ctx.report({
        message: `${g.count} compressed SID${g.count > 1 ? "s" : ""} of ${g.first.node} (${g.examples.join(", ")}${g.count > g.examples.length ? ", ..." : ""}) have the ${what} value 0, which is reserved to end a C-SID container`,
        location: ctx.locateSid(g.first),
        objects: [g.first.node, sid],
        hint: g.role === "local" ? "take the function (local C-SID) from the local pool, which never holds 0" : "give the node a non-zero value from the global pool",
        data: { node: g.first.node, sid, role: g.role, count: g.count, examples: g.examples.join(",") },
      });
    }
  },
};
