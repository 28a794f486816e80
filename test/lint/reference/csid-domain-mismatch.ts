// Reference copy (object views) of src/lint/rules/csid-domain-mismatch.ts as it was before the port to the packed table.
/** Compressed SIDs of one Locator-Block agree on the block length, the C-SID length and the C-SID flavour. */
import { Prefix } from "../../../src/net/prefix.js";
import { formatAddr } from "../../../src/net/text.js";
import { prefixMask } from "../../../src/net/uint128.js";
import type { OwnedSid, Rule } from "../../../src/lint/types.js";
import { replace16Locators, shapeOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";

interface Tally {
  count: number;
  first: OwnedSid;
}

interface Domain {
  readonly prefix: Prefix;
  count: number;
  first: OwnedSid;
  readonly flavors: Map<string, Tally>;
  readonly lengths: Map<number, Tally>;
}

function bump<K>(m: Map<K, Tally>, k: K, s: OwnedSid): void {
  const t = m.get(k);
  if (!t) m.set(k, { count: 1, first: s });
  else {
    t.count++;
    if (s.entry.row !== undefined && t.first.entry.row !== undefined && s.entry.row < t.first.entry.row) t.first = s;
  }
}

/** The values of a tally, most common first, as "A (n SIDs), B (m SIDs)"; and the least common one. */
function describe<K extends string | number>(m: Map<K, Tally>): { text: string; odd: [K, Tally] } {
  const list = [...m.entries()].sort((a, b) => b[1].count - a[1].count || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  return { text: list.map(([k, t]) => `${k} (${t.count} SID${t.count > 1 ? "s" : ""})`).join(", "), odd: list[list.length - 1]! };
}

export const csidDomainMismatch: Rule = {
  meta: RULES["csid-domain-mismatch"].meta,
  check(ctx) {
    const r16 = replace16Locators(ctx.sids);
    // One domain per Locator-Block prefix, read from each SID with its own block length.
    const domains = new Map<string, Domain>();
    for (const s of ctx.sids) {
      const v = shapeOf(s, r16);
      if (!v || v.st.block === 0) continue;
      const first = s.entry.sid & prefixMask(v.st.block);
      const key = `${v.st.block}:${first}`; // cheaper than formatting every SID's block
      let d = domains.get(key);
      if (!d) domains.set(key, (d = { prefix: new Prefix(first, v.st.block), count: 0, first: s, flavors: new Map(), lengths: new Map() }));
      d.count++;
      if (s.entry.row !== undefined && d.first.entry.row !== undefined && s.entry.row < d.first.entry.row) d.first = s;
      bump(d.flavors, v.flavor, s);
      bump(d.lengths, v.shape.length, s);
    }
    const report = (d: Domain, kind: "flavor" | "csid-length", text: string, odd: Tally, value: string | number) => {
      const sid = formatAddr(odd.first.entry.sid);
      const block = d.prefix.format();
      ctx.report({
        message:
          kind === "flavor"
            ? `compressed SIDs of Locator-Block ${block} mix C-SID flavours: ${text}`
            : `compressed SIDs of Locator-Block ${block} mix C-SID lengths: ${text} bits`,
        location: ctx.locateSid(odd.first),
        objects: [block, odd.first.node, sid],
        hint: kind === "flavor" ? "use one C-SID flavour per Locator-Block, or give the other flavour a block of its own" : "use one C-SID length for every SID of the Locator-Block",
        data: { block, kind, values: text, odd: value, sid, node: odd.first.node, count: odd.count },
      });
    };
    for (const d of domains.values()) {
      if (d.flavors.size > 1) {
        const { text, odd } = describe(d.flavors);
        report(d, "flavor", text, odd[1], odd[0]); // RFC 9800 §9.1; §6.4 (REPLACE-CSID sequences share the scheme)
      }
      if (d.lengths.size > 1) {
        const { text, odd } = describe(d.lengths);
        report(d, "csid-length", text, odd[1], odd[0]); // RFC 9800 §6.4: same Locator-Block and C-SID length; §9.1
      }
    }
    // Block prefixes nested in one another: the same SIDs' leading bits read with different block
    // lengths. Sweep the distinct prefixes in address order, keeping the open (containing) ones.
    const sorted = [...domains.values()].sort((a, b) => (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : a.prefix.len - b.prefix.len));
    const open: Domain[] = [];
    for (const d of sorted) {
      while (open.length > 0 && open[open.length - 1]!.prefix.last < d.prefix.first) open.pop();
      const outer = open[open.length - 1];
      if (outer && outer.prefix.contains(d.prefix.first)) {
        // RFC 9800 §6.3, §6.4: SIDs compressed together share one Locator-Block.
        const few = d.count <= outer.count ? d : outer;
        const sid = formatAddr(few.first.entry.sid);
        ctx.report({
          message: `compressed SIDs disagree on the Locator-Block: ${outer.count} SID${outer.count > 1 ? "s" : ""} state ${outer.prefix.format()} and ${d.count} SID${d.count > 1 ? "s" : ""} inside it state ${d.prefix.format()}`,
          location: ctx.locateSid(few.first),
          objects: [outer.prefix.format(), d.prefix.format(), few.first.node, sid],
          hint: "advertise every SID of the block with the same block length",
          data: { block: outer.prefix.format(), kind: "block-length", other: d.prefix.format(), blockBits: outer.prefix.len, otherBits: d.prefix.len, sid, node: few.first.node, count: few.count },
        });
      }
      open.push(d);
    }
  },
};
