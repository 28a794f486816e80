/**
 * A group's summary covers exactly its own locators: every member locator falls under it and no
 * other node's locator does. Checked for every declared `summary` and, when the input is a plan's
 * allocation, for every natural summary (block + algorithm bits + the group's level values).
 */
import { Prefix } from "../../net/prefix.js";
import type { Block, Group, Plan } from "../../plan/model.js";
import type { Rule } from "../types.js";
import { type LocatorGroup, locatorGroups, locatorLocator } from "../shared/locators.js";
import { PrefixIndex, isSubnetRange, wordRange } from "../shared/prefixes.js";
import { foreignInside, groupPlanPath, membersByGroup } from "../shared/summary.js";

/** True when `place` is the group `group` or lies below it ("north/quay" is under "north"). */
function isUnder(place: string, group: string): boolean {
  return place === group || place.startsWith(group + "/");
}

/** True when the block serves (part of) the group: no group limit, or a limit above or below it. */
function blockServes(b: Block, g: Group): boolean {
  return b.groups.length === 0 || b.groups.some((bg) => isUnder(g.path, bg) || isUnder(bg, g.path));
}

/**
 * The natural summary of a group in a block for one algorithm: the block bits, the algorithm's
 * index in `algorithm-bits`, then the level values of the group and its ancestors, each at its
 * level's width; length = block + algorithm bits + the levels down to the group. Undefined when a
 * group value is unknown.
 */
function naturalSummary(plan: Plan, groupValues: ReadonlyMap<string, bigint>, g: Group, b: Block, algorithm: number): Prefix | undefined {
  const parts = g.path.split("/");
  let v = 0n;
  let bits = 0;
  for (let i = 0; i < parts.length; i++) {
    const gv = groupValues.get(parts.slice(0, i + 1).join("/"));
    const level = plan.levels[i];
    if (gv === undefined || !level) return undefined;
    v = (v << BigInt(level.bits)) | gv;
    bits += level.bits;
  }
  const idx = b.algorithms.indexOf(algorithm);
  if (idx < 0) return undefined;
  const len = b.prefix.len + b.algorithmBits + bits;
  if (len > 128) return undefined;
  const field = (BigInt(idx) << BigInt(bits)) | v;
  return new Prefix(b.prefix.first | (field << BigInt(128 - len)), len);
}

const names = (ls: readonly LocatorGroup[]) => [...new Set(ls.flatMap((l) => l.nodes))];
const few = (xs: readonly string[]) => xs.slice(0, 5).join(", ") + (xs.length > 5 ? `, and ${xs.length - 5} more` : "");

export const summaryLeak: Rule = {
  meta: {
    id: "summary-leak",
    severity: "error",
    summary: "Make each group's summary cover all of its own locators and none of anybody else's.",
    rationale:
      "A region or site border advertises its summary instead of each locator. A member locator outside the summary must leak as a more specific route; another node's locator inside it draws that node's traffic into the wrong region. Either way the aggregation the plan promises does not hold.",
    source: "RFC 5375 §2.4; RFC 3531 (aggregation); common practice for region summaries",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const alloc = ctx.input.allocation;
    const locs = locatorGroups(ctx); // address order
    const members = membersByGroup(ctx);
    const where = locatorLocator(ctx);
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    const blockRanges = plan.blocks.map((b) => wordRange(b.prefix));
    const locate = (g: Group, declared: boolean, at: number) =>
      ctx.input.fromTable ? where(at) : ctx.locatePlan([...groupPlanPath(g.path), ...(declared ? ["summary"] : [])]);

    const judge = (g: Group, s: Prefix, declared: boolean, mine: readonly LocatorGroup[], own: ReadonlySet<LocatorGroup>, ownList: readonly LocatorGroup[], context: string, extra: Record<string, string | number>) => {
      const text = s.format();
      const kind = declared ? "declared" : "natural";
      const range = wordRange(s);
      // Every member locator under the summary (RFC 5375 §2.4: aggregation).
      const outside = mine.filter((l) => !isSubnetRange(l.range, range));
      if (outside.length > 0) {
        const who = names(outside);
        ctx.report({
          message: `${outside.length} locator${outside.length > 1 ? "s" : ""} of group ${g.path} ${outside.length > 1 ? "lie" : "lies"} outside its ${kind} summary ${text}${context}: ${few(outside.map((l) => `${l.prefix.format()} (${l.nodes.join(", ")})`))}`,
          location: locate(g, declared, outside[0]!.holders[0]!),
          objects: [g.path, text, ...who.slice(0, 5)],
          hint: declared ? "widen or move the summary, or move the nodes into the group's space" : "give the nodes values inside the group, or move them to the group they are numbered in",
          data: { group: g.path, summary: text, kind, direction: "outside", count: outside.length, ...extra },
        });
      }
      // No other node's locator under it.
      const foreign = foreignInside(locs, range, own, ownList);
      if (foreign.count > 0) {
        const who = names(foreign.sample);
        const more = foreign.count > foreign.sample.length ? `, and ${foreign.count - foreign.sample.length} more` : "";
        ctx.report({
          message: `${kind} summary ${text} of group ${g.path}${context} also covers ${foreign.count} locator${foreign.count > 1 ? "s" : ""} of other nodes: ${foreign.sample.map((l) => `${l.prefix.format()} (${l.nodes.join(", ")})`).join(", ")}${more}`,
          location: locate(g, declared, foreign.sample[0]!.holders[0]!),
          objects: [g.path, text, ...who.slice(0, 5)],
          hint: "narrow the summary, or renumber the foreign nodes out of it",
          data: { group: g.path, summary: text, kind, direction: "foreign", count: foreign.count, ...extra },
        });
      }
    };

    for (const g of plan.groups) {
      const mine = members.get(g.path) ?? [];
      const own = new Set(mine);
      if (g.summary) {
        const s = g.summary.masked();
        // A declared summary is one prefix: it speaks for the members in the block it lies in (all
        // members when it lies in no block or spans several).
        const inBlock = blocks.containing(s);
        const blockRange = inBlock && wordRange(inBlock.prefix);
        const scoped = blockRange ? mine.filter((l) => isSubnetRange(l.range, blockRange)) : mine;
        judge(g, s, true, scoped, own, mine, inBlock ? ` (block ${inBlock.value.name})` : "", {});
      }
      if (!alloc) continue; // natural summaries need the group values the allocation handed out
      for (const [k, b] of plan.blocks.entries()) {
        if (!blockServes(b, g)) continue;
        for (const a of b.algorithms) {
          const s = naturalSummary(plan, alloc.groupValues, g, b, a);
          if (!s || (g.summary && g.summary.equals(s))) continue;
          const scoped = mine.filter((l) => l.algorithm === a && isSubnetRange(l.range, blockRanges[k]!));
          judge(g, s, false, scoped, own, mine, ` (block ${b.name}, algorithm ${a})`, { block: b.name, algorithm: a });
        }
      }
    }
  },
};
