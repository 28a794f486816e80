/**
 * The domain's SIDs come from one aggregatable block, so that one prefix can be dropped at every
 * edge: the blocks (declared, or inferred from the SID structure of a bare table) that hold SIDs
 * must collapse into a single prefix.
 */
import { Prefix, collapse, coveringPrefix } from "../../net/prefix.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import type { Block } from "../../plan/model.js";
import type { Rule } from "../types.js";
import { PrefixIndex, locatorsByPrefix } from "./locator-outside-block.js";

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
    // The block length of a bare table: the most common advertised structure.block (the
    // shorter on ties, for a deterministic answer).
    const lengths = new Map<number, number>();
    for (const s of ctx.sids) {
      const b = s.entry.structure?.block;
      if (b !== undefined && b >= 1 && b <= 128) lengths.set(b, (lengths.get(b) ?? 0) + 1);
    }
    const modal = [...lengths.entries()].sort(([la, ca], [lb, cb]) => cb - ca || la - lb)[0]?.[0];
    const blocks = new PrefixIndex<Block>(plan?.blocks.map((b) => ({ prefix: b.prefix, value: b })) ?? []);
    if (!plan && modal === undefined) return; // no block length to judge by

    // One unit per locator (and per SID without a locator): its declared block, else its prefix
    // of the common block length.
    const unit = (p: Prefix): Prefix => blocks.containing(p)?.prefix ?? (modal !== undefined && p.len >= modal ? p.supernet(modal) : p.masked());
    const units = new Map<string, Prefix>();
    for (const g of locatorsByPrefix(ctx)) {
      const u = unit(g.prefix);
      units.set(u.format(), u);
    }
    for (const s of ctx.sids) {
      if (s.entry.locator) continue;
      const u = unit(new Prefix(s.entry.sid, 128));
      units.set(u.format(), u);
    }
    const merged = collapse([...units.values()]);
    if (merged.length <= 1) return;

    // SIDs per merged prefix (both sorted: one merge pass), to name the odd one out.
    const count = merged.map(() => 0);
    const firstSid = merged.map((): (typeof ctx.sids)[number] | undefined => undefined);
    let k = 0;
    for (const s of ctx.sids) {
      while (k < merged.length && merged[k]!.last < s.entry.sid) k++;
      if (k >= merged.length) break;
      if (!merged[k]!.contains(s.entry.sid)) continue;
      count[k]!++;
      const f = firstSid[k];
      if (!f || (f.entry.row ?? 0) > (s.entry.row ?? 0)) firstSid[k] = s;
    }
    let odd = merged.length - 1;
    for (let i = merged.length - 1; i >= 0; i--) if (count[i]! < count[odd]!) odd = i;
    const oddBlock = plan?.blocks.find((b) => b.prefix.isSubnetOf(merged[odd]!));
    const oddSid = firstSid[odd];
    const location: SourceLocation =
      !ctx.input.fromTable && oddBlock ? ctx.locatePlan(["blocks", oddBlock.index, "prefix"]) : oddSid ? ctx.locateSid(oddSid) : { file: ctx.input.file };
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
