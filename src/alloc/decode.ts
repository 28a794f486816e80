/**
 * Decoding an address against an allocated plan: which block, algorithm, level values, node,
 * behaviour, function and argument it is — what an engineer needs when reading a capture.
 */
import { formatAddr } from "../net/text.js";
import { type Addr, getField } from "../net/uint128.js";
import type { SidEntry } from "../sid/table.js";
import type { Allocation } from "./allocate.js";

export interface Decoded {
  readonly address: string;
  readonly block: string | undefined;
  readonly blockPrefix: string | undefined;
  readonly algorithm: number | undefined;
  /** level name -> value and the group it names (if any) */
  readonly levels: readonly { level: string; value: string; group: string | undefined }[];
  /** Nodes (or an anycast group) owning the locator. */
  readonly owners: readonly string[];
  readonly locator: string | undefined;
  readonly function: string | undefined;
  readonly argument: string | undefined;
  readonly sid: { behavior: string; flavors: readonly string[]; codepoint: number | undefined; context: Readonly<Record<string, string>> } | undefined;
  readonly note: string;
}

/**
 * The key of an address in the decoder's maps. Not the bigint itself: V8 hashes a bigint by its
 * low 64 bits only, and SIDs of one plan differ mostly above bit 64, so a Map keyed by bigints
 * puts them all in a few buckets and every lookup walks a long chain.
 */
const addrKey = (a: Addr) => a.toString(16);

/** A lookup from address to decoded meaning, built once per allocation. */
export class Decoder {
  private readonly bySid = new Map<string, { node: string; sid: SidEntry }[]>();
  private readonly byLocator = new Map<string, string[]>();
  /** `depth|parent path|value` -> group path */
  private readonly groupAt = new Map<string, { path: string; name: string }>();

  constructor(private readonly alloc: Allocation) {
    for (const g of alloc.plan.groups) {
      const v = alloc.groupValues.get(g.path);
      if (v !== undefined) this.groupAt.set(`${g.depth}|${g.parent ?? ""}|${v.toString(16)}`, { path: g.path, name: g.name });
    }
    for (const n of alloc.table.nodes) {
      for (const s of n.sids) {
        const k = addrKey(s.sid);
        const list = this.bySid.get(k);
        if (list) list.push({ node: n.node, sid: s });
        else this.bySid.set(k, [{ node: n.node, sid: s }]);
      }
      for (const l of n.locators) {
        const k = l.prefix.format();
        const owners = this.byLocator.get(k) ?? [];
        const who = l.anycast ? `${n.node} (anycast ${l.anycast})` : n.node;
        if (!owners.includes(who)) owners.push(who);
        this.byLocator.set(k, owners);
      }
    }
  }

  /** Decode one address. Never throws for addresses outside the plan: the note says so. */
  decode(addr: Addr): Decoded {
    const plan = this.alloc.plan;
    const address = formatAddr(addr);
    const block = plan.blocks.find((b) => b.prefix.contains(addr));
    if (!block) {
      return { address, block: undefined, blockPrefix: undefined, algorithm: undefined, levels: [], owners: [], locator: undefined, function: undefined, argument: undefined, sid: undefined, note: "the address is in none of the plan's blocks" };
    }
    const L = block.layout;
    const nodeField = getField(addr, L.blockBits, L.nodeBits);
    const levelBits = plan.levels.reduce((s, l) => s + l.bits, 0);
    const algoIndex = Number(nodeField >> BigInt(levelBits));
    const algorithm = block.algorithms[algoIndex];
    let offset = L.blockBits + block.algorithmBits;
    const levels: { level: string; value: string; group: string | undefined }[] = [];
    const path: string[] = [];
    plan.levels.forEach((lv, depth) => {
      const v = getField(addr, offset, lv.bits);
      offset += lv.bits;
      let group: string | undefined;
      if (depth < plan.levels.length - 1) {
        const parent = path.join("/");
        const g = this.groupAt.get(`${depth}|${parent}|${v.toString(16)}`);
        if (g !== undefined) {
          group = g.path;
          path.push(g.name);
        } else path.push("?");
      }
      levels.push({ level: lv.name, value: "0x" + v.toString(16), group });
    });
    const locLen = L.blockBits + L.nodeBits;
    const locText = `${formatAddr(addr & (((1n << BigInt(locLen)) - 1n) << BigInt(128 - locLen)))}/${locLen}`;
    const owners = this.byLocator.get(locText) ?? [];
    const fn = getField(addr, locLen, L.functionBits);
    const hits = this.bySid.get(addrKey(addr)) ?? [];
    // A SID with a non-zero argument (End.DT2M, C-SID containers) is found by clearing the argument.
    let sidHit = hits[0];
    let argument: bigint = 0n;
    let trailing = false;
    if (!sidHit) {
      for (const cand of [L.blockBits + L.nodeBits + L.functionBits, L.blockBits + L.nodeBits]) {
        const masked = addr & (((1n << BigInt(cand)) - 1n) << BigInt(128 - cand));
        const h = this.bySid.get(addrKey(masked));
        if (h && h[0]) {
          sidHit = h[0];
          // The argument is the field the SID's structure declares (e.g. 16 bits of Arg.FE2), not
          // everything after the function; bits after it must be zero (RFC 8986 §3.1).
          const st = h[0].sid.structure;
          const from = st ? st.block + st.node + st.function : cand;
          const width = st ? Math.min(st.argument, 128 - from) : 128 - cand;
          argument = getField(addr, from, width);
          trailing = from + width < 128 && getField(addr, from + width, 128 - from - width) !== 0n;
          break;
        }
      }
    }
    const note =
      owners.length === 0
        ? "no node of the plan owns this locator (unallocated or retired value)"
        : sidHit
          ? trailing
            ? "a SID of the plan, but with bits set after its argument, which must be zero (RFC 8986 §3.1)"
            : argument !== 0n
              ? "SID with a non-zero argument"
              : "SID of the plan"
          : "inside a node's locator, but no SID of the plan has this function";
    return {
      address,
      block: block.name,
      blockPrefix: block.prefix.format(),
      algorithm,
      levels,
      owners,
      locator: locText,
      function: "0x" + fn.toString(16),
      argument: "0x" + (sidHit ? argument : getField(addr, locLen + L.functionBits, 128 - locLen - L.functionBits)).toString(16),
      sid: sidHit ? { behavior: sidHit.sid.behavior, flavors: sidHit.sid.flavors, codepoint: sidHit.sid.codepoint, context: sidHit.sid.context } : undefined,
      note,
    };
  }
}
