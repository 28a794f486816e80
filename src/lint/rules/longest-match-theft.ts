/**
 * A locator must stay the longest match for its SIDs: a more specific prefix inside it (another
 * node's locator, a locator of another algorithm, an infrastructure prefix) takes that part of
 * its space away by longest-prefix match.
 */
import type { Prefix } from "../../net/prefix.js";
import type { Rule } from "../types.js";
import { locatorGroups, locatorLocator, sidsByNode, sidsOfNodeIn } from "../shared/locators.js";
import { type WordRange, compareRanges, endsBefore, wordRange } from "../shared/prefixes.js";

/** One prefix of the sweep: a locator (with its holders) or a declared infrastructure prefix. */
interface Item {
  readonly prefix: Prefix;
  /** The prefix as words, for the sort and the sweep. */
  readonly range: WordRange;
  readonly kind: "locator" | "infrastructure";
  /** Holder nodes of a locator; empty for infrastructure. */
  readonly nodes: readonly string[];
  readonly algorithm: number;
  /** Name of an infrastructure entry; "" for a locator. */
  readonly name: string;
  /** A locator: the locator id (packed table) of its first holder, to locate it when reported; -1 for infrastructure. */
  readonly holder: number;
  /** Index into plan.infrastructure for an infrastructure prefix; -1 for a locator. */
  readonly infra: number;
}

export const longestMatchTheft: Rule = {
  meta: {
    id: "longest-match-theft",
    severity: "warning",
    summary: "Keep more specific prefixes out of a locator so it stays the longest match for its SIDs.",
    rationale:
      "Routers forward on the longest matching prefix. A locator of another node, a locator of another algorithm, or an infrastructure prefix that is more specific than a locator and lies inside it pulls that part of the locator's space to another place or another topology: SIDs there become unreachable or follow the wrong algorithm.",
    source: "RFC 9352 §5; RFC 9513 §5",
    needs: "table",
  },
  check(ctx) {
    const plan = ctx.input.plan;
    const t = ctx.packed.table;
    const where = locatorLocator(ctx);
    const items: Item[] = [];
    for (const g of locatorGroups(ctx)) {
      items.push({ prefix: g.prefix, range: g.range, kind: "locator", nodes: g.nodes, algorithm: g.algorithm, name: "", holder: g.holders[0]!, infra: -1 });
    }
    plan?.infrastructure.forEach((x, i) => {
      const prefix = x.prefix.masked();
      items.push({ prefix, range: wordRange(prefix), kind: "infrastructure", nodes: [], algorithm: -1, name: x.name, holder: -1, infra: i });
    });
    items.sort((a, b) => compareRanges(a.range, b.range));
    // located only when reported (an infrastructure prefix of a table's --plan is not the table's)
    const locate = (it: Item) => (it.holder >= 0 ? where(it.holder) : ctx.input.fromTable ? undefined : ctx.locatePlan(["infrastructure", it.infra, "prefix"]));

    // What the thief takes: the robbed nodes' SIDs of the locator's algorithm inside it.
    const byNode = sidsByNode(ctx);
    const stolen = (nodes: readonly string[], algorithm: number, inner: WordRange): number[] => {
      const out: number[] = [];
      for (const n of nodes) for (const i of sidsOfNodeIn(t, byNode, n, inner)) if (t.algorithm[i] === algorithm) out.push(i);
      return out;
    };

    // Sweep in address order with a stack of open prefixes: each open prefix contains the next
    // one up, so a new item meets exactly the prefixes that contain it (n log n for the sort).
    // One finding per robbed locator, however many prefixes rob it.
    const robbed = new Map<Item, { thieves: Item[]; taken: number[] }>();
    const open: Item[] = [];
    for (const cur of items) {
      while (open.length > 0 && endsBefore(open[open.length - 1]!.range, cur.range)) open.pop();
      for (const outer of open) {
        if (outer.kind !== "locator") continue; // only a locator can be robbed
        if (cur.prefix.len <= outer.prefix.len) continue; // equal prefixes are locator-overlap's and infrastructure-collision's
        // The same node's own, same-algorithm, more specific locator routes to the same place.
        if (cur.kind === "locator" && cur.algorithm === outer.algorithm && cur.nodes.every((n) => outer.nodes.includes(n))) continue;
        const r = robbed.get(outer) ?? { thieves: [], taken: [] };
        r.thieves.push(cur);
        for (const i of stolen(outer.nodes, outer.algorithm, cur.range)) r.taken.push(i);
        robbed.set(outer, r);
      }
      open.push(cur);
    }
    const describe = (outer: Item, t: Item) =>
      t.kind === "infrastructure"
        ? `infrastructure prefix ${t.prefix.format()} (${t.name})`
        : t.nodes.every((n) => outer.nodes.includes(n))
          ? `locator ${t.prefix.format()} of the same node for algorithm ${t.algorithm}`
          : `locator ${t.prefix.format()} of ${t.nodes.join(", ")} (algorithm ${t.algorithm})`;
    for (const [outer, { thieves, taken }] of robbed) {
      const victim = outer.prefix.format();
      const first = thieves[0]!;
      const list = thieves.slice(0, 3).map((t) => describe(outer, t)).join("; ") + (thieves.length > 3 ? `; and ${thieves.length - 3} more` : "");
      const sids = new Set(taken).size; // nested thieves may count a SID twice
      // RFC 9352 §5 / RFC 9513 §5: the locator must be the longest match for its SIDs.
      ctx.report({
        message: `locator ${victim} of ${outer.nodes.join(", ")} (algorithm ${outer.algorithm}) is not the longest match for all of its space: ${list} ${thieves.length > 1 ? "are" : "is"} more specific${sids ? ` and take${thieves.length > 1 ? "" : "s"} ${sids} of its SIDs` : ""}`,
        location: locate(first) ?? (taken.length > 0 ? ctx.locateSidAt(taken[0]!) : (locate(outer) ?? { file: ctx.input.file })),
        objects: [...outer.nodes, victim, ...thieves.slice(0, 3).flatMap((t) => [...(t.kind === "infrastructure" ? [t.name] : t.nodes), t.prefix.format()])],
        hint: first.kind === "infrastructure" ? "move the infrastructure prefix out of the SID block" : "give the locators disjoint space: a node's locators for different algorithms, and different nodes' locators, must not nest",
        data: { locator: victim, algorithm: outer.algorithm, thief: first.prefix.format(), thiefKind: first.kind, thieves: thieves.length, stolenSids: sids },
      });
    }
  },
};
