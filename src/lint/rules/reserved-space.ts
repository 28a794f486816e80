/**
 * SID space must not come from ranges the IANA registries set aside for something else (loopback,
 * link-local, multicast, IPv4 embedding, transition mechanisms, other IETF protocols, space still
 * "Reserved by IETF"). The file also holds the subject scan that the documentation-space,
 * edge-filtering and infrastructure-collision rules share.
 */
import { Prefix } from "../../net/prefix.js";
import { type SpaceCategory, type SpaceRange, classify, rangesOverlapping } from "../../net/special.js";
import { formatAddr } from "../../net/text.js";
import type { SourceLocation } from "../../plan/diagnostic.js";
import type { OwnedSid, Rule, RuleContext } from "../types.js";
import { PrefixIndex, locatorLocator, locatorsByPrefix } from "./locator-outside-block.js";

/** Something the space rules judge: a block, a locator outside every block, or one stray SID (/128). */
export interface SpaceSubject {
  readonly kind: "block" | "locator" | "sid";
  readonly prefix: Prefix;
  /** For people: "block metro", "locator 5f00::/64 of r1", "SID 5f00::1 of r1". */
  readonly label: string;
  readonly objects: readonly string[];
  readonly location: SourceLocation;
  /** The stray SID, for kind "sid". */
  readonly sid?: OwnedSid;
}

/**
 * The subjects of the space rules, outermost first, so one cause gives one finding: the declared
 * blocks of the plan (or, when `inferBlocks` is set and there is no plan, the blocks a bare table
 * implies: each SID's prefix of its advertised block length, else its locator); then every locator
 * outside those blocks; then every SID outside all of them. Deterministic order.
 */
export function spaceSubjects(ctx: RuleContext, inferBlocks: boolean): { prefixes: SpaceSubject[]; strays: SpaceSubject[] } {
  const plan = ctx.input.plan;
  const prefixes: SpaceSubject[] = [];
  if (plan) {
    for (const b of plan.blocks) {
      prefixes.push({ kind: "block", prefix: b.prefix, label: `block ${b.name} (${b.prefix.format()})`, objects: [b.name, b.prefix.format()], location: ctx.locatePlan(["blocks", b.index, "prefix"]) });
    }
  } else if (inferBlocks) {
    const seen = new Map<string, { prefix: Prefix; sid: OwnedSid }>();
    for (const s of ctx.sids) {
      const st = s.entry.structure;
      const p = st && st.block >= 1 && st.block <= 128 ? new Prefix(s.entry.sid, st.block).masked() : s.entry.locator?.masked();
      if (!p) continue;
      const k = p.format();
      const prev = seen.get(k);
      if (!prev || (prev.sid.entry.row ?? 0) > (s.entry.row ?? 0)) seen.set(k, { prefix: p, sid: s });
    }
    for (const [k, v] of [...seen.entries()].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) {
      prefixes.push({ kind: "block", prefix: v.prefix, label: `block ${k} (from the SID structure of the table)`, objects: [k], location: ctx.locateSid(v.sid) });
    }
  }
  const blocks = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p })));
  const where = locatorLocator(ctx);
  const locs: SpaceSubject[] = [];
  for (const g of locatorsByPrefix(ctx)) {
    if (blocks.containing(g.prefix)) continue;
    const nodes = g.holders.map((h) => h.node);
    locs.push({ kind: "locator", prefix: g.prefix, label: `locator ${g.prefix.format()} of ${nodes.join(", ")}`, objects: [...nodes, g.prefix.format()], location: where(g.holders[0]!) });
  }
  prefixes.push(...locs);
  const covered = new PrefixIndex(prefixes.map((p) => ({ prefix: p.prefix, value: p })));
  const strays: SpaceSubject[] = [];
  for (const s of ctx.sids) {
    if (covered.containingAddr(s.entry.sid)) continue;
    const a = formatAddr(s.entry.sid);
    strays.push({ kind: "sid", prefix: new Prefix(s.entry.sid, 128), label: `SID ${a} of ${s.node}`, objects: [s.node, a], location: ctx.locateSid(s), sid: s });
  }
  return { prefixes, strays };
}

/**
 * The registry rows that decide for at least one address of `p` (the most specific row wins for
 * each address), most specific first. Same reading as isGloballyReachable in src/net/special.ts:
 * a row counts when the part of (row ∩ p) that more specific rows leave uncovered is not empty.
 */
export function decidingRows(p: Prefix): SpaceRange[] {
  const rows = rangesOverlapping(p);
  return rows.filter((r) => {
    if (rows.some((c) => c.prefix.len > r.prefix.len && p.isSubnetOf(c.prefix))) return false;
    const inter = r.prefix.len >= p.len ? r.prefix : p.masked();
    const nested = rows.filter((c) => c.prefix.len > r.prefix.len && c.prefix.isSubnetOf(inter));
    let covered = 0n;
    for (const c of nested) {
      if (!nested.some((o) => o !== c && o.prefix.len < c.prefix.len && c.prefix.isSubnetOf(o.prefix))) covered += c.prefix.size;
    }
    return covered < inter.size;
  });
}

/** One cause found by a space rule: a subject and the registry row it falls in; `count` SIDs for stray SIDs. */
export interface SpaceHit {
  readonly subject: SpaceSubject;
  readonly row: SpaceRange;
  /** Stray SIDs of one node in one row are one hit; count says how many. */
  readonly count: number;
}

/**
 * Every (subject, row) whose row's category is in `categories`: one per block or locator, one per
 * node and row for SIDs outside every block and locator. A prefix that spans rows gets one hit per row.
 */
export function scanSpecialSpace(ctx: RuleContext, categories: ReadonlySet<SpaceCategory>): SpaceHit[] {
  const { prefixes, strays } = spaceSubjects(ctx, true);
  const hits: SpaceHit[] = [];
  for (const s of prefixes) {
    for (const row of decidingRows(s.prefix)) if (categories.has(row.category)) hits.push({ subject: s, row, count: 1 });
  }
  const byNodeRow = new Map<string, { subject: SpaceSubject; row: SpaceRange; count: number }>();
  for (const s of strays) {
    const row = classify(s.prefix); // a /128 always has a row
    if (!categories.has(row.category)) continue;
    const k = `${s.sid!.node}|${row.text}`;
    const prev = byNodeRow.get(k);
    if (prev) prev.count++;
    else byNodeRow.set(k, { subject: s, row, count: 1 });
  }
  hits.push(...byNodeRow.values());
  return hits;
}

/** What the hit is, for messages: the subject, or "N SIDs of node" for a group of stray SIDs. */
export function hitLabel(h: SpaceHit): string {
  return h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.sid!.node} (first ${formatAddr(h.subject.sid!.entry.sid)})` : h.subject.label;
}

/** The categories this rule refuses (IANA IPv6 Special-Purpose Address Registry; IANA IPv6 Address Space registry). */
const RESERVED: ReadonlySet<SpaceCategory> = new Set<SpaceCategory>([
  "loopback", // RFC 4291
  "unspecified", // RFC 4291
  "ipv4-mapped", // RFC 4291
  "ipv4-compatible", // RFC 4291 §2.5.5.1 (deprecated)
  "link-local", // RFC 4291 §2.5.6: routers must not forward it
  "multicast", // RFC 4291 §2.7
  "site-local-deprecated", // RFC 3879 §4
  "6to4", // RFC 3056
  "teredo", // RFC 4380
  "discard", // RFC 6666
  "benchmarking", // RFC 5180
  "nat64", // RFC 6052, RFC 8215
  "orchid", // RFC 4843, RFC 7343
  "ietf-protocol", // RFC 2928
  "other-special", // AMT, AS112, DETs: IANA IPv6 Special-Purpose Address Registry
  "anycast-service", // RFC 7723, RFC 8155
  // "Reserved by IETF" space (IANA IPv6 Address Space registry). 5f00::/16 inside 4000::/3 is a
  // more specific row of its own (RFC 9602), so it never lands here.
  "reserved-by-ietf",
]);

export const reservedSpace: Rule = {
  meta: {
    id: "reserved-space",
    severity: "error",
    summary: "Take blocks, locators and SIDs only from space meant for SRv6: not from loopback, link-local, multicast, IPv4-embedding, transition, other protocol or IETF-reserved ranges.",
    rationale:
      "These ranges have a fixed meaning: routers refuse to forward some of them (loopback, link-local, site-local), others belong to transition mechanisms or other protocols, and IETF-reserved space may be assigned tomorrow. SIDs there are dropped or collide with that use. 5f00::/16 is the range set aside for SRv6 SIDs.",
    source: "IANA IPv6 Special-Purpose Address Registry; IANA IPv6 Address Space registry; RFC 4291; RFC 3879; RFC 9602",
    needs: "table",
  },
  check(ctx) {
    for (const h of scanSpecialSpace(ctx, RESERVED)) {
      const p = h.subject.kind === "sid" ? formatAddr(h.subject.sid!.entry.sid) : h.subject.prefix.format();
      ctx.report({
        message: `${hitLabel(h)} falls in ${h.row.text} (${h.row.name}, ${h.row.source}), which is not SID space`,
        location: h.subject.location,
        objects: [...h.subject.objects, h.row.text],
        hint: "carve SIDs from 5f00::/16 (RFC 9602) or from the operator's own global unicast space",
        data: { prefix: p, subject: h.subject.kind, range: h.row.text, category: h.row.category, count: h.count },
      });
    }
  },
};
