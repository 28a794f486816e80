/** SID blocks, locators and SIDs stay out of the prefixes the plan declares as infrastructure. */
import type { Prefix } from "../../net/prefix.js";
import type { Rule } from "../types.js";
import { type SpaceSubject, spaceSubjects } from "./reserved-space.js";

interface Item {
  readonly prefix: Prefix;
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
    const items: Item[] = [
      ...plan.infrastructure.map((x, i) => ({ prefix: x.prefix.masked(), infra: i })),
      ...[...prefixes, ...strays].map((s) => ({ prefix: s.prefix, subject: s })),
    ];
    items.sort((a, b) => (a.prefix.first < b.prefix.first ? -1 : a.prefix.first > b.prefix.first ? 1 : a.prefix.len - b.prefix.len));

    // Sweep with a stack of open prefixes: prefixes nest or are disjoint, so every overlapping
    // pair is an open prefix and a newcomer inside it.
    const hits = new Map<string, { subject: SpaceSubject; infra: number; count: number }>();
    const open: Item[] = [];
    for (const cur of items) {
      while (open.length > 0 && open[open.length - 1]!.prefix.last < cur.prefix.first) open.pop();
      for (const o of open) {
        const infra = o.infra ?? cur.infra;
        const subject = o.subject ?? cur.subject;
        if (infra === undefined || subject === undefined || (o.infra !== undefined) === (cur.infra !== undefined)) continue;
        // Stray SIDs of one node in one infrastructure prefix are one cause.
        const k = subject.kind === "sid" ? `sid|${subject.sid!.node}|${infra}` : `${subject.kind}|${subject.prefix.format()}|${infra}`;
        const prev = hits.get(k);
        if (prev) prev.count++;
        else hits.set(k, { subject, infra, count: 1 });
      }
      open.push(cur);
    }
    for (const h of hits.values()) {
      const x = plan.infrastructure[h.infra]!;
      const what = h.subject.kind === "sid" && h.count > 1 ? `${h.count} SIDs of ${h.subject.sid!.node} (first ${h.subject.objects[1]})` : h.subject.label;
      // RFC 8986 §9: SID space must be distinct from infrastructure space.
      ctx.report({
        message: `${what} overlaps infrastructure prefix ${x.prefix.format()} (${x.name}, ${x.kind})`,
        location: h.subject.location,
        objects: [...h.subject.objects, x.name, x.prefix.format()],
        hint: "move the SID block (or the infrastructure prefix) so that the two do not overlap",
        data: { subject: h.subject.kind, prefix: h.subject.kind === "sid" ? h.subject.objects[1]! : h.subject.prefix.format(), infrastructure: x.name, infrastructurePrefix: x.prefix.format(), count: h.count },
      });
    }
  },
};
