// Reference copy (object views) of src/lint/rules/csid-length.ts as it was before the port to the packed table.
/**
 * The old object-view helpers the compressed-SID reference rules share (the flavour and shape
 * readings did not change in the port and come from src/lint/shared/csid.ts), and csid-length.
 */
import { formatAddr } from "../../../src/net/text.js";
import type { Addr } from "../../../src/net/uint128.js";
import { type CsidFlavor, type CsidShape, csidFlavorOf, csidShape } from "../../../src/lint/shared/csid.js";
import type { SidStructure } from "../../../src/sid/table.js";
import type { OwnedSid, Rule, RuleContext } from "../../../src/lint/types.js";
import { RULES } from "../../../src/lint/rules/index.js";

export { type CsidFlavor, csidFlavorOf, csidShape };

/** Key of a SID's locator taken from its own bits: the first block + node bits. */
export function locatorKeyOf(sid: Addr, st: SidStructure): string {
  const len = st.block + st.node;
  return `${len}:${len >= 128 ? sid : sid >> BigInt(128 - len)}`;
}

/**
 * Locators (as {@link locatorKeyOf}) on which some REPLACE-CSID SID is advertised with node 16 and
 * function 0: RFC 9800 §6.4 reads such a locator, and its SIDs with node 16 + function 16, as 16-bit
 * compression. One pass over the SIDs.
 */
export function replace16Locators(sids: readonly OwnedSid[]): Set<string> {
  const out = new Set<string>();
  for (const s of sids) {
    const st = s.entry.structure;
    if (!st || st.node !== 16 || st.function !== 0 || st.block + st.node > 128) continue;
    if (csidFlavorOf(s.entry.flavors) === "REPLACE-CSID") out.add(locatorKeyOf(s.entry.sid, st));
  }
  return out;
}

/** The C-SID shape of one SID, or undefined when it is not compressed or its structure is unknown or too long. */
export function shapeOf(s: OwnedSid, replace16: ReadonlySet<string>): { flavor: CsidFlavor; st: SidStructure; shape: CsidShape } | undefined {
  const st = s.entry.structure;
  if (!st) return undefined;
  const flavor = csidFlavorOf(s.entry.flavors);
  if (!flavor) return undefined;
  if (st.block + st.node + st.function > 128) return undefined; // structure-too-long reports it
  return { flavor, st, shape: csidShape(flavor, st, flavor === "REPLACE-CSID" && replace16.has(locatorKeyOf(s.entry.sid, st))) };
}

/**
 * Where to report a finding about a SID that the block layout decides: the plan block the SID was
 * allocated from (plan input), otherwise the node (table input).
 */
export function blockScope(ctx: RuleContext): (s: OwnedSid) => { key: string; block?: { name: string; index: number; path: (string | number)[] } } {
  const plan = ctx.input.plan;
  if (ctx.input.fromTable || !plan) return (s) => ({ key: `node:${s.node}` });
  const blockOfLocator = new Map<string, string>();
  const keyOf = (p: { first: bigint; len: number }) => `${p.len}:${p.first}`;
  for (const l of ctx.locators) if (l.entry.block !== "") blockOfLocator.set(keyOf(l.entry.prefix), l.entry.block);
  const byName = new Map(plan.blocks.map((b) => [b.name, b]));
  return (s) => {
    const name = s.entry.locator ? blockOfLocator.get(keyOf(s.entry.locator)) : undefined;
    const b = name === undefined ? undefined : byName.get(name);
    if (!b) return { key: `node:${s.node}` };
    return { key: `block:${b.name}`, block: { name: b.name, index: b.index, path: ["blocks", b.index, b.layout.kind === "classic" ? "structure" : "compression"] } };
  };
}

export const csidLength: Rule = {
  meta: RULES["csid-length"].meta,
  check(ctx) {
    const r16 = replace16Locators(ctx.sids);
    const scopeOf = blockScope(ctx);
    const groups = new Map<string, { first: OwnedSid; count: number; length: number; flavor: CsidFlavor; block?: { name: string; index: number; path: (string | number)[] } }>();
    for (const s of ctx.sids) {
      const v = shapeOf(s, r16);
      if (!v) continue;
      const { flavor, st, shape } = v;
      if (shape.length === 16 || shape.length === 32) continue; // RFC 9800 §4.1, §4.2: 16 or 32 bits
      const scope = scopeOf(s);
      const key = `${scope.key}|${flavor}|${st.block}/${st.node}/${st.function}`;
      const g = groups.get(key);
      if (!g) groups.set(key, { first: s, count: 1, length: shape.length, flavor, block: scope.block });
      else {
        g.count++;
        if (s.entry.row !== undefined && g.first.entry.row !== undefined && s.entry.row < g.first.entry.row) g.first = s;
      }
    }
    for (const g of groups.values()) {
      const st = g.first.entry.structure!;
      const sid = formatAddr(g.first.entry.sid);
      const where = g.block ? `block ${g.block.name}` : g.first.node;
      const reading =
        g.flavor === "NEXT-CSID"
          ? st.node === st.function
            ? `node ${st.node} + function ${st.function} bits read as one C-SID of ${g.length} bits (two C-SIDs of ${st.node} bits are not allowed either)`
            : `node ${st.node} + function ${st.function} bits make a C-SID of ${g.length} bits`
          : `node ${st.node} + function ${st.function} bits make a C-SID (LNFL) of ${g.length} bits`;
      ctx.report({
        message: `${g.count} ${g.flavor} SID${g.count > 1 ? "s" : ""} of ${where} (e.g. ${sid}): ${reading}; C-SIDs must be 16 or 32 bits`,
        location: g.block ? ctx.locatePlan(g.block.path) : ctx.locateSid(g.first),
        objects: g.block ? [g.block.name, g.first.node, sid] : [g.first.node, sid],
        hint:
          g.flavor === "NEXT-CSID"
            ? "use 16 or 32 node bits and either no function (global C-SID), a function of the same length (global + local C-SID), or node + function of 16 or 32 bits"
            : "use node + function of 16 or 32 bits, or node 16 + function 16 on a locator whose End SID has node 16 and no function (RFC 9800 §6.4)",
        data: { ...(g.block ? { block: g.block.name } : {}), node: g.first.node, sid, flavor: g.flavor, blockBits: st.block, nodeBits: st.node, functionBits: st.function, csidLength: g.length, count: g.count },
      });
    }
  },
};
