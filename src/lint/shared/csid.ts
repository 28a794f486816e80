/**
 * Compressed SIDs (RFC 9800) as the compressed-SID rules read them from the packed table: the
 * C-SID flavour of a flavour list, how a SID's structure forms C-SIDs, the locators that read as
 * 16-bit REPLACE-CSID, and the plan block a SID's finding belongs to. Each is made once per run
 * (ctx.shared) and judged per flavour set or kind of SID (sids.ts), not per SID.
 */
import { parseFlavor } from "../../sid/behaviors.js";
import type { SidStructure } from "../../sid/table.js";
import type { RuleContext } from "../types.js";
import { PrefixMap, nodeKeyOf, sidKinds } from "./sids.js";

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

/** {@link csidFlavorOf} of each flavour set of ctx.packed (by flavour-set id): 0 none, 1 NEXT-CSID, 2 REPLACE-CSID. */
export function csidFlavorCodes(ctx: RuleContext): Uint8Array {
  const sets = ctx.packed.table.flavorSets;
  return ctx.shared("csid:flavor-codes", () => {
    return Uint8Array.from(sets, (f) => {
      const c = csidFlavorOf(f);
      return c === "NEXT-CSID" ? 1 : c === "REPLACE-CSID" ? 2 : 0;
    });
  });
}

/** The flavour of a code of {@link csidFlavorCodes}. */
export const CSID_FLAVOR_OF_CODE: readonly (CsidFlavor | undefined)[] = [undefined, "NEXT-CSID", "REPLACE-CSID"];

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

/**
 * Locators, taken from SIDs' own bits (the first block + node bits), on which some REPLACE-CSID SID
 * is advertised with node 16 and function 0: RFC 9800 §6.4 reads such a locator, and its SIDs with
 * node 16 + function 16, as 16-bit compression. One pass over the SIDs, made once per run.
 */
export function replace16Locators(ctx: RuleContext): PrefixMap<true> {
  // made before: a view is not made inside another (the engine would time it twice)
  const t = ctx.packed.table;
  const codes = csidFlavorCodes(ctx);
  return ctx.shared("csid:replace16", () => {
    const out = new PrefixMap<true>(t);
    // structures of such an End SID: node 16, function 0, locator within 128 bits
    const marks = Uint8Array.from(t.structures, (st) => (st.node === 16 && st.function === 0 && st.block + st.node <= 128 ? 1 : 0));
    if (!marks.includes(1)) return out;
    for (let i = 0; i < t.count; i++) {
      const st = t.structure[i]!;
      if (st < 0 || marks[st] === 0 || codes[t.flavorSet[i]!] !== 2) continue;
      out.set(i, t.structures[st]!.block + 16, true);
    }
    return out;
  });
}

/** A compressed SID read as C-SIDs. */
export interface CsidReading {
  readonly flavor: CsidFlavor;
  readonly st: SidStructure;
  readonly shape: CsidShape;
}

/** The C-SID readings of the SIDs of ctx.packed. */
export interface CsidShapes {
  /** False when no SID is compressed with a structure that fits: the compressed-SID rules have nothing to judge. */
  readonly any: boolean;
  /**
   * The reading of SID i, or undefined when it is not compressed or its structure is unknown or
   * too long (structure-too-long reports it). Readings are made per kind of SID and shared: SIDs
   * read alike give the same object.
   */
  at(i: number): CsidReading | undefined;
}

/** The C-SID readings of ctx.packed's SIDs, made once per run. */
export function shapeOf(ctx: RuleContext): CsidShapes {
  // made before: a view is not made inside another (the engine would time it twice)
  const t = ctx.packed.table;
  const codes = csidFlavorCodes(ctx);
  const kinds = sidKinds(ctx);
  return ctx.shared("csid:shape-of", () => {
    // per kind: the reading, and the one on a 16-bit REPLACE-CSID locator when it differs
    const plain: (CsidReading | undefined)[] = [];
    const on16: (CsidReading | undefined)[] = [];
    const made = new Map<string, CsidReading>();
    const reading = (flavor: CsidFlavor, st: SidStructure, stId: number, replace16: boolean): CsidReading => {
      const key = `${flavor}|${stId}|${replace16}`;
      let r = made.get(key);
      if (!r) made.set(key, (r = { flavor, st, shape: csidShape(flavor, st, replace16) }));
      return r;
    };
    for (let k = 0; k < kinds.count; k++) {
      const stId = kinds.structure[k]!;
      const flavor = CSID_FLAVOR_OF_CODE[codes[kinds.flavorSet[k]!]!];
      if (stId < 0 || !flavor) continue;
      const st = t.structures[stId]!;
      if (st.block + st.node + st.function > 128) continue;
      plain[k] = reading(flavor, st, stId, false);
      if (flavor === "REPLACE-CSID" && st.node === 16 && st.function === 16) on16[k] = reading(flavor, st, stId, true);
    }
    let r16: PrefixMap<true> | undefined;
    return {
      any: plain.some((r) => r !== undefined),
      at(i: number): CsidReading | undefined {
        const k = kinds.of[i]!;
        const v = plain[k];
        if (v === undefined) return undefined;
        const w = on16[k];
        if (w !== undefined && (r16 ??= replace16Locators(ctx)).get(i, v.st.block + v.st.node)) return w;
        return v;
      },
    };
  });
}

/** A plan block a finding is reported on, with the path of its layout. */
export interface ScopeBlock {
  readonly name: string;
  readonly index: number;
  readonly path: (string | number)[];
}

/**
 * Where a finding about a SID that the block layout decides belongs: the plan block the SID was
 * allocated from (plan input), otherwise the SID's node (table input). Scopes are numbers below
 * `count`: a node key (nodeKeyOf) or, after the nodes, a block.
 */
export interface BlockScopes {
  readonly count: number;
  of(i: number): number;
  /** The block of a scope, or undefined for a node scope. */
  block(scope: number): ScopeBlock | undefined;
}

/** The scopes of ctx.packed's SIDs, made once per run. */
export function blockScope(ctx: RuleContext): BlockScopes {
  const { table: t, locatorOrder } = ctx.packed;
  return ctx.shared("csid:block-scope", () => {
    const nodes = t.nodeNames.length;
    const plan = ctx.input.plan;
    if (ctx.input.fromTable || !plan) return { count: nodes, of: (i) => nodeKeyOf(t, i), block: () => undefined };
    // a locator's block by its prefix (host bits cleared), as the plan's locators name it
    const blockOfLocator = new Map<string, string>();
    const keyOf = (p: { first: bigint; len: number }) => `${p.len}:${p.first}`;
    for (const id of locatorOrder) {
      const l = t.locatorEntry(id);
      if (l.block !== "") blockOfLocator.set(keyOf(l.prefix), l.block);
    }
    const byName = new Map(plan.blocks.map((b) => [b.name, b]));
    const blocks: ScopeBlock[] = plan.blocks.map((b) => ({ name: b.name, index: b.index, path: ["blocks", b.index, b.layout.kind === "classic" ? "structure" : "compression"] }));
    const position = new Map(plan.blocks.map((b, k) => [b, k]));
    // per prefix id: the scope of SIDs under it (-1: their node)
    const ofPrefix = Int32Array.from(t.prefixes, (p) => {
      const name = blockOfLocator.get(keyOf(p));
      const b = name === undefined ? undefined : byName.get(name);
      return b ? nodes + position.get(b)! : -1;
    });
    return {
      count: nodes + blocks.length,
      of: (i) => {
        const loc = t.locator[i]!;
        const s = loc < 0 ? -1 : ofPrefix[t.locPrefix[loc]!]!;
        return s >= 0 ? s : nodeKeyOf(t, i);
      },
      block: (scope) => (scope >= nodes ? blocks[scope - nodes] : undefined),
    };
  });
}
