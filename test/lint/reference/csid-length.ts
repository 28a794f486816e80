// Reference copy (object views) of src/lint/rules/csid-length.ts as it was before the port to the packed table.
/**
 * Compressed SIDs use C-SIDs of 16 or 32 bits. This file also holds the reading of a compressed
 * SID's structure into C-SIDs that the other compressed-SID rules share.
 */
import { formatAddr } from "../../../src/net/text.js";
import type { Addr } from "../../../src/net/uint128.js";
import { parseFlavor } from "../../../src/sid/behaviors.js";
import type { SidStructure } from "../../../src/sid/table.js";
import type { OwnedSid, Rule, RuleContext } from "../../../src/lint/types.js";

/** The two C-SID flavours of RFC 9800. */
export type CsidFlavor = "NEXT-CSID" | "REPLACE-CSID";

/**
 * The C-SID flavour in a flavour list (any spelling {@link parseFlavor} reads), or undefined for an
 * uncompressed SID. A list holding both (illegal, reported by flavor-illegal) reads as NEXT-CSID.
 */
export function csidFlavorOf(flavors: readonly string[]): CsidFlavor | undefined {
  let replace = false;
  for (const f of flavors) {
    const p = parseFlavor(f);
    if (p === "NEXT-CSID") return p;
    if (p === "REPLACE-CSID") replace = true;
  }
  return replace ? "REPLACE-CSID" : undefined;
}

/**
 * How the node and function bits of a compressed SID form C-SIDs:
 * - `one`: a single C-SID of `length` = node + function bits (either part may be empty, RFC 9800 §2);
 * - `two`: a global (node) C-SID followed by a local (function) C-SID, both `length` bits
 *   (the combined global+local advertisement of RFC 9800 §8).
 */
export interface CsidShape {
  readonly kind: "one" | "two";
  readonly length: number;
}

/**
 * Read a compressed SID's structure as C-SIDs. `replace16` says whether the SID's locator carries a
 * REPLACE-CSID SID advertised with node 16, function 0 (see {@link replace16Locators}).
 *
 * - NEXT-CSID, node = function > 0: two C-SIDs of `node` bits when that is 16 or 32 (global+local,
 *   RFC 9800 §8); other equal halves (e.g. 8 + 8) read as one C-SID of both halves.
 * - NEXT-CSID otherwise (function 0: global C-SID alone; node 0: local C-SID alone, RFC 9800 §5.3;
 *   or one C-SID holding node and function): one C-SID of node + function bits.
 * - REPLACE-CSID, node = function = 16 on a locator marked 16-bit: two 16-bit C-SIDs (RFC 9800 §6.4
 *   scheme detection); otherwise one C-SID of node + function bits (LNFL).
 */
export function csidShape(flavor: CsidFlavor, st: SidStructure, replace16: boolean): CsidShape {
  const n = st.node;
  const f = st.function;
  if (flavor === "NEXT-CSID") {
    if (n > 0 && n === f && (n === 16 || n === 32)) return { kind: "two", length: n };
    return { kind: "one", length: n + f };
  }
  if (n === 16 && f === 16 && replace16) return { kind: "two", length: 16 };
  return { kind: "one", length: n + f };
}

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
  meta: {
    id: "csid-length",
    severity: "error",
    summary: "Give compressed SIDs C-SIDs of 16 or 32 bits.",
    rationale:
      "RFC 9800 defines C-SID lengths of 16 and 32 bits only (NEXT-CSID must support a 32-bit block with 16-bit C-SIDs, REPLACE-CSID must support 32-bit C-SIDs). A source node cannot pack a C-SID of any other length into a container, so the SID is carried uncompressed or, worse, compressed wrongly by a node that guesses.",
    source: "RFC 9800 §4.1, §4.2, §6.1, §6.4, §8",
    needs: "table",
  },
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
