/** SID blocks, locators and SIDs stay out of the prefixes the plan declares as infrastructure. */
import type { Prefix } from "../../net/prefix.js";
import type { Rule } from "../types.js";
import { type WordRange, compareRanges, compareSid, endsBefore, wordRange } from "../shared/prefixes.js";
import { type SpaceSubject, spaceSubjects, straySubject } from "../shared/space.js";

interface Item {
  readonly prefix: Prefix;
  /** The prefix as words, for the sort and the sweep. */
  readonly range: WordRange;
  readonly subject?: SpaceSubject;
  /** Index into plan.infrastructure for an infrastructure prefix. */
  readonly infra?: number;
}

export const infrastructureCollision: Rule = {
  meta: {
    id: "infrastructure-collision",
    severity: "error",
    summary: "Keep SID blocks, locators and SIDs apart from the infrastructure prefixes (loopbacks, links, customers).",
    rationale:
      "The domain's edge filters and the per-node SID filters tell SID space from infrastructure and end-user space by prefix. A SID block that overlaps loopbacks, link subnets or customer space cannot be filtered as a trust boundary, and the same address ends up with two meanings.",
    source: "RFC 8986 §9 (SID space distinct from infrastructure and end-user space); RFC 8754 §5.1",
    needs: "plan",
  },
  check(ctx) {
    const plan = ctx.input.plan!;
    if (plan.infrastructure.length === 0) return;
    const { prefixes, strays } = spaceSubjects(ctx, false);
    const t = ctx.packed.table;
    const items: Item[] = [
      ...plan.infrastructure.map((x, i) => ({ prefix: x.prefix.masked(), range: wordRange(x.prefix), infra: i })),
      ...prefixes.map((s) => ({ prefix: s.prefix, range: s.range, subject: s })),
    ];
    items.sort((a, b) => compareRanges(a.range, b.range));

    // Sweep with a stack of open prefixes: prefixes nest or are disjoint, so every overlapping
    // pair is an open prefix and a newcomer inside it. Stray SIDs (/128s, in address order) join
    // the sweep before the first prefix that starts after them; one only meets the open prefixes.
    const hits = new Map<string, { subject: SpaceSubject; infra: number; count: number }>();
    const open: Item[] = [];
    const hit = (k: string, subject: SpaceSubject | (() => SpaceSubject), infra: number) => {
      const prev = hits.get(k);
      if (prev) prev.count++;
      else hits.set(k, { subject: typeof subject === "function" ? subject() : subject, infra, count: 1 });
    };
    let next = 0; // the next stray SID
    const straysBefore = (limit: Item | undefined) => {
      const r = limit?.range;
      for (; next < strays.length; next++) {
        const i = strays[next]!;
        if (r && compareSid(t, i, r.f0, r.f1, r.f2, r.f3) >= 0) return;
        for (let o = open[open.length - 1]?.range; o && compareSid(t, i, o.l0, o.l1, o.l2, o.l3) > 0; o = open[open.length - 1]?.range) open.pop();
        // Stray SIDs of one node in one infrastructure prefix are one cause.
        for (const o of open) if (o.infra !== undefined) hit(`sid|${t.nodeOf(i)}|${o.infra}`, () => straySubject(ctx, i), o.infra);
      }
    };
    for (const cur of items) {
      straysBefore(cur);
      while (open.length > 0 && endsBefore(open[open.length - 1]!.range, cur.range)) open.pop();
      for (const o of open) {
        const infra = o.infra ?? cur.infra;
        const subject = o.subject ?? cur.subject;
        if (infra === undefined || subject === undefined || (o.infra !== undefined) === (cur.infra !== undefined)) continue;
        hit(`${subject.kind}|${subject.text}|${infra}`, subject, infra);
      }
      open.push(cur);
    }
    straysBefore(undefined);
    for (const h of hits.values()) {
      const x = plan.infrastructure[h.infra]!;
      const what = h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.node} (first ${h.subject.text})` : h.subject.label;
      // RFC 8986 §9: SID space must be distinct from infrastructure space.
      ctx.report({
        message: `${what} overlaps infrastructure prefix ${x.prefix.format()} (${x.name}, ${x.kind})`,
        location: h.subject.location,
        objects: [...h.subject.objects, x.name, x.prefix.format()],
        hint: "move the SID block (or the infrastructure prefix) so that the two do not overlap",
        data: { subject: h.subject.kind, prefix: h.subject.text, infrastructure: x.name, infrastructurePrefix: x.prefix.format(), count: h.count },
      });
    }
  },
};
