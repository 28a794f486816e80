/** Compressed SIDs of one Locator-Block agree on the block length, the C-SID length and the C-SID flavour. */
import { Prefix } from "../../net/prefix.js";
import { fromWords } from "../../net/uint128.js";
import { shapeOf } from "../shared/csid.js";
import { PrefixMap, SidGroup, SidGroups, compareSids, leadMask } from "../shared/sids.js";
import type { Rule } from "../types.js";

/** The compressed SIDs of one Locator-Block prefix, tallied by flavour and by C-SID length. */
interface Domain {
  readonly prefix: Prefix;
  readonly all: SidGroup;
  readonly flavors: SidGroups;
  readonly lengths: SidGroups;
}

/** The values of a tally, most common first, as "A (n SIDs), B (m SIDs)"; and the least common one. */
function describe(m: SidGroups): { text: string; odd: [string | number, SidGroup] } {
  const list = [...m.entries()].sort((a, b) => b[1].count - a[1].count || (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
  return { text: list.map(([k, t]) => `${k} (${t.count} SID${t.count > 1 ? "s" : ""})`).join(", "), odd: list[list.length - 1]! };
}

export const csidDomainMismatch: Rule = {
  meta: {
    id: "csid-domain-mismatch",
    severity: "error",
    summary: "Give all compressed SIDs of one Locator-Block the same block length, C-SID length and C-SID flavour.",
    rationale:
      "A source compresses consecutive SIDs into one container only when they share the Locator-Block, and REPLACE-CSID SIDs only when they also share the C-SID length; mixing lengths or flavours under one block makes SID lists longer or impossible to compress, and a block length stated differently by some SIDs means the sources disagree on where the C-SIDs start.",
    source: "RFC 9800 §6.2, §6.3, §6.4, §9.1",
    needs: "table",
  },
  check(ctx) {
    const t = ctx.packed.table;
    const shapes = shapeOf(ctx);
    if (!shapes.any) return;
    // One domain per Locator-Block prefix, read from each SID with its own block length.
    const domains = new PrefixMap<Domain>(t);
    for (let i = 0; i < t.count; i++) {
      const v = shapes.at(i);
      if (!v || v.st.block === 0) continue;
      const len = v.st.block;
      let d = domains.get(i, len);
      if (!d) {
        const first = fromWords(t.w0[i]! & leadMask(len), t.w1[i]! & leadMask(len - 32), t.w2[i]! & leadMask(len - 64), t.w3[i]! & leadMask(len - 96));
        d = { prefix: new Prefix(first, len), all: new SidGroup(t, undefined, i), flavors: new SidGroups(t), lengths: new SidGroups(t) };
        domains.set(i, len, d);
      } else d.all.take(i);
      d.flavors.add(v.flavor, i, undefined);
      d.lengths.add(v.shape.length, i, undefined);
    }
    const list = domains.values().sort((a, b) => compareLead(a.all, b.all));
    const report = (d: Domain, kind: "flavor" | "csid-length", text: string, odd: SidGroup, value: string | number) => {
      const i = odd.first;
      const node = t.nodeOf(i);
      const sid = t.formatSid(i);
      const block = d.prefix.format();
      ctx.report({
        message:
          kind === "flavor"
            ? `compressed SIDs of Locator-Block ${block} mix C-SID flavours: ${text}`
            : `compressed SIDs of Locator-Block ${block} mix C-SID lengths: ${text} bits`,
        location: ctx.locateSidAt(i),
        objects: [block, node, sid],
        hint: kind === "flavor" ? "use one C-SID flavour per Locator-Block, or give the other flavour a block of its own" : "use one C-SID length for every SID of the Locator-Block",
        data: { block, kind, values: text, odd: value, sid, node, count: odd.count },
      });
    };
    for (const d of list) {
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
    const sorted = [...list].sort((a, b) => (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : a.prefix.len - b.prefix.len));
    const open: Domain[] = [];
    for (const d of sorted) {
      while (open.length > 0 && open[open.length - 1]!.prefix.last < d.prefix.first) open.pop();
      const outer = open[open.length - 1];
      if (outer && outer.prefix.contains(d.prefix.first)) {
        // RFC 9800 §6.3, §6.4: SIDs compressed together share one Locator-Block.
        const few = d.all.count <= outer.all.count ? d : outer;
        const i = few.all.first;
        const node = t.nodeOf(i);
        const sid = t.formatSid(i);
        ctx.report({
          message: `compressed SIDs disagree on the Locator-Block: ${outer.all.count} SID${outer.all.count > 1 ? "s" : ""} state ${outer.prefix.format()} and ${d.all.count} SID${d.all.count > 1 ? "s" : ""} inside it state ${d.prefix.format()}`,
          location: ctx.locateSidAt(i),
          objects: [outer.prefix.format(), d.prefix.format(), node, sid],
          hint: "advertise every SID of the block with the same block length",
          data: { block: outer.prefix.format(), kind: "block-length", other: d.prefix.format(), blockBits: outer.prefix.len, otherBits: d.prefix.len, sid, node, count: few.all.count },
        });
      }
      open.push(d);
    }

    function compareLead(a: SidGroup, b: SidGroup): number {
      return compareSids(t, a.lead, b.lead);
    }
  },
};
