/** Compressed blocks use the Locator-Block lengths RFC 9800 asks implementations to support or recommends. */
import { Prefix } from "../../net/prefix.js";
import { fromWords } from "../../net/uint128.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import { type CsidFlavor, type CsidReading, shapeOf } from "../shared/csid.js";
import { PrefixMap, SidGroups, leadMask } from "../shared/sids.js";
import type { Rule, RuleContext } from "../types.js";

/** Block lengths RFC 9800 §4.2 recommends for REPLACE-CSID, for easier reading in operation. */
const REPLACE_RECOMMENDED: readonly number[] = [48, 56, 64, 72, 80];

type Kind = "next-not-32-16" | "replace-not-recommended" | "replace-limit";

/** What to say about a block length, or undefined when there is nothing to say. */
export function judge(flavor: CsidFlavor, blockBits: number, csidBits: number): { kind: Kind; limit?: number } | undefined {
  if (csidBits !== 16 && csidBits !== 32) return undefined; // csid-length reports it
  if (flavor === "NEXT-CSID") {
    // RFC 9800 §4.1: a 32-bit block with 16-bit C-SIDs MUST be supported; others MAY be.
    return blockBits === 32 && csidBits === 16 ? undefined : { kind: "next-not-32-16" };
  }
  // RFC 9800 §4.2: LBL at most 128 - LNFL - ceil(log2(128 / LNFL)) (the index bits).
  const limit = 128 - csidBits - Math.ceil(Math.log2(128 / csidBits));
  if (blockBits > limit) return { kind: "replace-limit", limit };
  // RFC 9800 §4.2: 48, 56, 64, 72 or 80 bits are recommended.
  return REPLACE_RECOMMENDED.includes(blockBits) ? undefined : { kind: "replace-not-recommended" };
}

export function say(where: string, flavor: CsidFlavor, blockBits: number, csidBits: number, j: { kind: Kind; limit?: number }): { message: string; hint: string } {
  switch (j.kind) {
    case "next-not-32-16":
      return {
        message: `${where} uses NEXT-CSID with a ${blockBits}-bit block and ${csidBits}-bit C-SIDs; every NEXT-CSID node must support a 32-bit block with 16-bit C-SIDs, other combinations only may be supported`,
        hint: "check that every node of the domain supports this block and C-SID length, or use a /32 block with 16-bit C-SIDs",
      };
    case "replace-limit":
      return {
        message: `${where} uses REPLACE-CSID with a ${blockBits}-bit block and ${csidBits}-bit C-SIDs; the block may be at most ${j.limit} bits (128 - C-SID ${csidBits} - index ${128 - csidBits - j.limit!} bits)`,
        hint: `shorten the block to /${j.limit} or less`,
      };
    case "replace-not-recommended":
      return {
        message: `${where} uses REPLACE-CSID with a ${blockBits}-bit block; blocks of ${REPLACE_RECOMMENDED.join(", ")} bits are recommended for easier reading`,
        hint: `consider a block of ${REPLACE_RECOMMENDED.join(", ")} bits`,
      };
  }
}

export const csidBlockLength: Rule = {
  meta: {
    id: "csid-block-length",
    severity: "info",
    summary: "Prefer the Locator-Block lengths RFC 9800 requires support for or recommends.",
    rationale:
      "Every NEXT-CSID node must support a 32-bit block with 16-bit C-SIDs; other combinations work only where all nodes support them. REPLACE-CSID blocks of 48 to 80 bits in steps of 8 are recommended for reading, and a REPLACE-CSID block longer than 128 minus the C-SID and index bits leaves no room for the index.",
    source: "RFC 9800 §4.1, §4.2",
    needs: "table",
  },
  check(ctx: RuleContext) {
    const plan = ctx.input.plan;
    if (!ctx.input.fromTable && plan) {
      for (const b of plan.blocks) {
        const L = b.layout;
        if (L.kind !== "compressed") continue;
        const j = judge(L.flavor, L.blockBits, L.csidBits);
        if (!j) continue;
        const { message, hint } = say(`block ${b.name} (${b.prefix.format()})`, L.flavor, L.blockBits, L.csidBits, j);
        ctx.report({
          message,
          location: ctx.locatePlan(["blocks", b.index, "prefix"]),
          objects: [b.name, b.prefix.format()],
          hint,
          data: { block: b.name, flavor: L.flavor, blockBits: L.blockBits, csidBits: L.csidBits, kind: j.kind, ...(j.limit !== undefined ? { limit: j.limit } : {}) },
        });
      }
      return;
    }
    // Table: one finding per Locator-Block prefix, flavour and C-SID length. The judgement does not
    // depend on the prefix, so a SID whose block and C-SID lengths are fine is passed by at once.
    const t = ctx.packed.table;
    const shapes = shapeOf(ctx);
    if (!shapes.any) return;
    const judged = new Map<CsidReading, boolean>();
    const blockIds = new PrefixMap<number>(t); // Locator-Block prefix -> id
    const blocks: Prefix[] = [];
    const groups = new SidGroups<number>(t); // data: the block id
    for (let i = 0; i < t.count; i++) {
      const v = shapes.at(i);
      if (!v || v.st.block === 0) continue;
      let bad = judged.get(v);
      if (bad === undefined) judged.set(v, (bad = judge(v.flavor, v.st.block, v.shape.length) !== undefined));
      if (!bad) continue;
      const len = v.st.block;
      let b = blockIds.get(i, len);
      if (b === undefined) {
        b = blocks.length;
        blocks.push(new Prefix(fromWords(t.w0[i]! & leadMask(len), t.w1[i]! & leadMask(len - 32), t.w2[i]! & leadMask(len - 64), t.w3[i]! & leadMask(len - 96)), len));
        blockIds.set(i, len, b);
      }
      groups.add((b * 2 + (v.flavor === "NEXT-CSID" ? 0 : 1)) * 129 + v.shape.length, i, b);
    }
    for (const g of groups.ordered()) {
      const prefix = blocks[g.data]!;
      const { flavor, shape } = shapes.at(g.lead)!;
      const csidBits = shape.length;
      const j = judge(flavor, prefix.len, csidBits)!;
      const i = g.first;
      const node = t.nodeOf(i);
      const block = prefix.format();
      const sid = t.formatSid(i);
      const { message, hint } = say(`Locator-Block ${block} (${g.count} SID${g.count > 1 ? "s" : ""}, e.g. ${sid})`, flavor, prefix.len, csidBits, j);
      const location: SourceLocation = ctx.locateSidAt(i);
      ctx.report({
        message,
        location,
        objects: [block, node, sid],
        hint,
        data: { block, flavor, blockBits: prefix.len, csidBits, kind: j.kind, ...(j.limit !== undefined ? { limit: j.limit } : {}), sid, count: g.count },
      });
    }
  },
};
