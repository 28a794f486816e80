// Reference copy (object views) of src/lint/rules/csid-block-length.ts as it was before the port to the packed table.
/** Compressed blocks use the Locator-Block lengths RFC 9800 asks implementations to support or recommends. */
import { Prefix } from "../../../src/net/prefix.js";
import { formatAddr } from "../../../src/net/text.js";
import { prefixMask } from "../../../src/net/uint128.js";
import type { SourceLocation } from "../../../src/plan/diagnostic.js";
import type { OwnedSid, Rule, RuleContext } from "../../../src/lint/types.js";
import { type CsidFlavor, replace16Locators, shapeOf } from "./csid-length.js";
import { RULES } from "../../../src/lint/rules/index.js";

/** Block lengths RFC 9800 §4.2 recommends for REPLACE-CSID, for easier reading in operation. */
const REPLACE_RECOMMENDED: readonly number[] = [48, 56, 64, 72, 80];

type Kind = "next-not-32-16" | "replace-not-recommended" | "replace-limit";

/** What to say about a block length, or undefined when there is nothing to say. */
function judge(flavor: CsidFlavor, blockBits: number, csidBits: number): { kind: Kind; limit?: number } | undefined {
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

function say(where: string, flavor: CsidFlavor, blockBits: number, csidBits: number, j: { kind: Kind; limit?: number }): { message: string; hint: string } {
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
  meta: RULES["csid-block-length"].meta,
  check(ctx: RuleContext) {
    const plan = ctx.input.plan;
    // A plan's block layouts: this branch did not change in the port, so it is the real rule's.
    if (!ctx.input.fromTable && plan) return RULES["csid-block-length"].check(ctx);
    // Table: one finding per Locator-Block prefix, flavour and C-SID length.
    const r16 = replace16Locators(ctx.sids);
    const groups = new Map<string, { first: OwnedSid; count: number; prefix: Prefix; flavor: CsidFlavor; csidBits: number }>();
    for (const s of ctx.sids) {
      const v = shapeOf(s, r16);
      if (!v || v.st.block === 0) continue;
      const first = s.entry.sid & prefixMask(v.st.block);
      const key = `${v.st.block}:${first}|${v.flavor}|${v.shape.length}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, prefix: new Prefix(first, v.st.block), flavor: v.flavor, csidBits: v.shape.length });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const j = judge(g.flavor, g.prefix.len, g.csidBits);
      if (!j) continue;
      const block = g.prefix.format();
      const sid = formatAddr(g.first.entry.sid);
      const { message, hint } = say(`Locator-Block ${block} (${g.count} SID${g.count > 1 ? "s" : ""}, e.g. ${sid})`, g.flavor, g.prefix.len, g.csidBits, j);
      const location: SourceLocation = ctx.locateSid(g.first);
      ctx.report({
        message,
        location,
        objects: [block, g.first.node, sid],
        hint,
        data: { block, flavor: g.flavor, blockBits: g.prefix.len, csidBits: g.csidBits, kind: j.kind, ...(j.limit !== undefined ? { limit: j.limit } : {}), sid, count: g.count },
      });
    }
  },
};
