/**
 * The domain's SIDs come from one aggregatable block, so that one prefix can be dropped at every
 * edge: the blocks (declared, or inferred from the SID structure of a bare table) that hold SIDs
 * must collapse into a single prefix.
 */
import { Prefix, collapse, coveringPrefix, summarizeRange } from "../../net/prefix.js";
import { fromWords } from "../../net/uint128.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import type { Block } from "../../plan/model.js";
import { type PackedSidTable, maskWord } from "../../sid/packed.js";
import type { Rule } from "../types.js";
import { locatorGroups } from "../shared/locators.js";
import { PrefixIndex, compareSid, maskSidInto, sameSid, wordRange } from "../shared/prefixes.js";

export const blockAggregation: Rule = {
  meta: {
    id: "block-aggregation",
    severity: "warning",
    summary: "Take all SIDs of the domain from one aggregatable block.",
    rationale:
      "Every external interface must drop packets to the SID block; with SIDs in one block S/s that is one filter entry everywhere. SIDs spread over blocks that do not aggregate need one entry per block on every edge, and an edge that misses one lets outside traffic steer through the domain.",
    source: "RFC 8754 §5.1 (one block S/s filtered at every edge); RFC 8986 §9",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const { table: t, sidOrder } = ctx.packed;
    // The block length of a bare table: the most common advertised structure.block (the
    // shorter on ties, for a deterministic answer). Counted per structure id, then per length.
    const perStructure = new Int32Array(t.structures.length);
    for (let i = 0; i < t.count; i++) if (t.structure[i]! >= 0) perStructure[t.structure[i]!]!++;
    const lengths = new Map<number, number>();
    t.structures.forEach((st, k) => {
      const b = st.block;
      if (perStructure[k]! > 0 && b >= 1 && b <= 128) lengths.set(b, (lengths.get(b) ?? 0) + perStructure[k]!);
    });
    const modal = [...lengths.entries()].sort(([la, ca], [lb, cb]) => cb - ca || la - lb)[0]?.[0];
    const blocks = new PrefixIndex<Block>(plan?.blocks.map((b) => ({ prefix: b.prefix, value: b })) ?? []);
    if (!plan && modal === undefined) return; // no block length to judge by

    // One unit per locator (and per SID without a locator): its declared block, else its prefix
    // of the common block length. Neighbours mostly share a unit, so a unit is only made and
    // named when it differs from the one before. collapse below only looks at the addresses the
    // units cover, so SIDs that are their own unit (/128) are handed over as runs of addresses.
    const units = new Map<string, Prefix>();
    const addUnit = (u: Prefix) => units.set(u.format(), u);
    let lastBlock: Prefix | undefined;
    const addBlock = (b: Prefix) => b !== lastBlock && addUnit((lastBlock = b));
    const m = new Uint32Array(4); // the words of a prefix of the modal length
    let lastModal: Uint32Array | undefined;
    const addModal = () => {
      if (lastModal && lastModal.every((w, q) => w === m[q])) return;
      lastModal = m.slice();
      addUnit(new Prefix(fromWords(m[0]!, m[1]!, m[2]!, m[3]!), modal!));
    };
    for (const g of locatorGroups(ctx)) {
      const b = blocks.containingRange(g.range)?.prefix;
      if (b) addBlock(b);
      else if (modal !== undefined && g.prefix.len >= modal) {
        const p = g.prefixId;
        m[0] = maskWord(t.pw0[p]!, modal);
        m[1] = maskWord(t.pw1[p]!, modal - 32);
        m[2] = maskWord(t.pw2[p]!, modal - 64);
        m[3] = maskWord(t.pw3[p]!, modal - 96);
        addModal();
      } else addUnit(g.prefix);
    }
    let runFirst = -1; // first and last SID of the current run of /128 units
    let runLast = -1;
    const endRun = () => {
      if (runFirst >= 0) for (const u of summarizeRange(t.sidAt(runFirst), t.sidAt(runLast))) addUnit(u);
      runFirst = -1;
    };
    for (let k = 0; k < sidOrder.length; k++) {
      const i = sidOrder[k]!;
      if (t.locator[i]! >= 0) continue;
      const b = blocks.containingSid(t, i)?.prefix;
      if (b) addBlock(b);
      else if (modal !== undefined) {
        maskSidInto(t, i, modal, m);
        addModal();
      } else if (runFirst >= 0 && (sameSid(t, i, runLast) || followsSid(t, runLast, i))) runLast = i;
      else {
        endRun();
        runFirst = runLast = i;
      }
    }
    endRun();
    const merged = collapse([...units.values()]);
    if (merged.length <= 1) return;

    // SIDs per merged prefix (both sorted: one merge pass), to name the odd one out.
    const ranges = merged.map(wordRange);
    const count = merged.map(() => 0);
    const firstSid = merged.map(() => -1);
    let k = 0;
    for (let q = 0; q < sidOrder.length; q++) {
      const i = sidOrder[q]!;
      while (k < ranges.length && compareSid(t, i, ranges[k]!.l0, ranges[k]!.l1, ranges[k]!.l2, ranges[k]!.l3) > 0) k++;
      if (k >= ranges.length) break;
      const r = ranges[k]!;
      if (compareSid(t, i, r.f0, r.f1, r.f2, r.f3) < 0) continue;
      count[k]!++;
      const f = firstSid[k]!;
      if (f < 0 || t.row[f]! > t.row[i]!) firstSid[k] = i;
    }
    let odd = merged.length - 1;
    for (let i = merged.length - 1; i >= 0; i--) if (count[i]! < count[odd]!) odd = i;
    const oddBlock = plan?.blocks.find((b) => b.prefix.isSubnetOf(merged[odd]!));
    const oddSid = firstSid[odd]!;
    const location: SourceLocation =
      !ctx.input.fromTable && oddBlock ? ctx.locatePlan(["blocks", oddBlock.index, "prefix"]) : oddSid >= 0 ? ctx.locateSidAt(oddSid) : { file: ctx.input.file };
    const list = merged.map((p) => p.format());
    const cover = coveringPrefix(merged)!.format();
    // RFC 8754 §5.1: all SIDs from one block S/s, dropped at every external interface.
    ctx.report({
      message: `the domain's SIDs spread over ${merged.length} prefixes that do not aggregate (${list.slice(0, 5).join(", ")}${list.length > 5 ? ", ..." : ""}); every edge needs ${merged.length} filter entries, or the covering ${cover}, which holds other space too`,
      location,
      objects: list.slice(0, 5),
      hint: plan ? "move the blocks next to each other inside one prefix (e.g. consecutive /48s of one /46), or renumber the stray locators into a declared block" : "renumber the stray locators into the main block",
      data: { prefixes: merged.length, list: list.slice(0, 5).join(" "), covering: cover, smallest: list[odd]!, ...(modal !== undefined ? { blockLength: modal } : {}) },
    });
  },
};

/** True when the address of SID j is that of SID i plus one. */
function followsSid(t: PackedSidTable, i: number, j: number): boolean {
  const a = [t.w0[i]!, t.w1[i]!, t.w2[i]!, t.w3[i]!];
  const b = [t.w0[j]!, t.w1[j]!, t.w2[j]!, t.w3[j]!];
  let carry = 1;
  for (let q = 3; q >= 0; q--) {
    const sum = a[q]! + carry;
    carry = sum > 0xffffffff ? 1 : 0;
    if (sum >>> 0 !== b[q]) return false;
  }
  return carry === 0; // the last address has no successor
}
