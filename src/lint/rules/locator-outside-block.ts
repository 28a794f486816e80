/**
 * Every locator lies inside a declared SID block. The file also holds two small helpers the other
 * space rules share: an index of outermost prefixes for containment in log time, and the
 * location of a locator (the first table row under it, or its node in the plan).
 */
import { type Prefix, comparePrefixes } from "../../net/prefix.js";
import type { Addr } from "../../net/uint128.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import type { OwnedLocator, OwnedSid, Rule, RuleContext } from "../types.js";

/**
 * Containment questions against a set of prefixes in log time. Only the outermost prefixes are
 * kept (a prefix nested in another adds no address), sorted by first address; prefixes nest or are
 * disjoint, so the one candidate for a question is the last kept prefix starting at or before it.
 * An empty set contains nothing.
 */
export class PrefixIndex<T> {
  private readonly outer: { readonly prefix: Prefix; readonly value: T }[] = [];

  constructor(items: readonly { readonly prefix: Prefix; readonly value: T }[]) {
    const sorted = [...items].sort((a, b) => comparePrefixes(a.prefix, b.prefix));
    for (const it of sorted) {
      const top = this.outer[this.outer.length - 1];
      if (top && top.prefix.last >= it.prefix.first) continue; // nested in the previous outermost prefix
      this.outer.push(it);
    }
  }

  /** The outermost prefix of the set that holds all of `p`, if any. */
  containing(p: Prefix): { readonly prefix: Prefix; readonly value: T } | undefined {
    const c = this.candidate(p.first);
    return c && c.prefix.isSupernetOf(p) ? c : undefined;
  }

  /** The outermost prefix of the set that holds the address `a`, if any. */
  containingAddr(a: Addr): { readonly prefix: Prefix; readonly value: T } | undefined {
    const c = this.candidate(a);
    return c && c.prefix.contains(a) ? c : undefined;
  }

  private candidate(a: Addr): { readonly prefix: Prefix; readonly value: T } | undefined {
    let lo = 0;
    let hi = this.outer.length - 1;
    let best = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (this.outer[mid]!.prefix.first <= a) {
        best = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    return best >= 0 ? this.outer[best] : undefined;
  }
}

/** Key of a locator of a node (host bits ignored). */
const locKey = (node: string, p: Prefix) => `${node}|${p.masked().format()}`;

/**
 * Where a locator is: for a table, the first row (lowest row number) of a SID declared under it;
 * for a plan, or a locator with no SID row, the node. Built once in one pass over the SIDs.
 */
export function locatorLocator(ctx: RuleContext): (l: OwnedLocator) => SourceLocation {
  const first = new Map<string, OwnedSid>();
  for (const s of ctx.sids) {
    const loc = s.entry.locator;
    if (!loc || s.entry.row === undefined) continue;
    const k = locKey(s.node, loc);
    const prev = first.get(k);
    if (!prev || (prev.entry.row ?? 0) > s.entry.row) first.set(k, s);
  }
  return (l) => {
    const s = first.get(locKey(l.node, l.entry.prefix));
    return s ? ctx.locateSid(s) : ctx.locateNode(l.node);
  };
}

/**
 * The locators grouped by prefix and algorithm, with every node that holds each (anycast members
 * share one). Keeps the address order of ctx.locators; holders sorted by name.
 */
export function locatorsByPrefix(ctx: RuleContext): { prefix: Prefix; algorithm: number; holders: OwnedLocator[] }[] {
  const map = new Map<string, { prefix: Prefix; algorithm: number; holders: OwnedLocator[] }>();
  for (const l of ctx.locators) {
    const k = `${l.entry.algorithm}|${l.entry.prefix.masked().format()}`;
    let g = map.get(k);
    if (!g) {
      g = { prefix: l.entry.prefix.masked(), algorithm: l.entry.algorithm, holders: [] };
      map.set(k, g);
    }
    if (!g.holders.some((h) => h.node === l.node)) g.holders.push(l);
  }
  const out = [...map.values()];
  for (const g of out) g.holders.sort((a, b) => (a.node < b.node ? -1 : a.node > b.node ? 1 : 0));
  return out;
}

export const locatorOutsideBlock: Rule = {
  meta: {
    id: "locator-outside-block",
    severity: "error",
    summary: "Carve every locator out of a declared SID block.",
    rationale:
      "A locator is the block followed by the node bits (B:N). A locator outside every declared block escapes the filters that keep SRv6 traffic inside the domain, since the edge drops only packets to the SID block, and it cannot be summarised with the rest of the plan.",
    source: "RFC 8986 §3.1 (locator = B:N); RFC 8754 §5.1 (one SID block filtered at the edge)",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    const blocks = new PrefixIndex(plan.blocks.map((b) => ({ prefix: b.prefix, value: b })));
    const where = locatorLocator(ctx);
    const names = plan.blocks.map((b) => `${b.name} ${b.prefix.format()}`).join(", ");
    // One finding per locator prefix: anycast members share one locator and one cause.
    for (const g of locatorsByPrefix(ctx)) {
      // RFC 8986 §3.1: the locator is B:N, so it must sit inside a block B.
      if (blocks.containing(g.prefix)) continue;
      const loc = g.prefix.format();
      const nodes = g.holders.map((h) => h.node);
      ctx.report({
        message: `locator ${loc} (algorithm ${g.algorithm}) of ${nodes.join(", ")} lies outside every declared block (${names || "the plan declares none"})`,
        location: where(g.holders[0]!),
        objects: [...nodes, loc],
        hint: "take the locator from one of the plan's blocks, or declare the block it comes from",
        data: { locator: loc, algorithm: g.algorithm, nodes: nodes.join(",") },
      });
    }
  },
};
