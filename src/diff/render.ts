/**
 * A table diff for people (a summary table and one line per change) and for programs (JSON,
 * described by schemas/diff.schema.json). Pure: data in, text out, deterministic.
 */
import Table from "cli-table3";
import { formatAddr } from "../net/text.js";
import { type LocatorEntry, type SidEntry, formatContext } from "../sid/table.js";
import type { LocatorChange, SidChange, TableDiff, Touch } from "./diff.js";

export const DIFF_SCHEMA_ID = "sidcarve/diff/v1";

/** Where one side of the diff came from. */
export interface DiffSide {
  readonly file: string;
  readonly kind: "plan" | "csv" | "json-table";
  /** The plan name (from the plan, or the table's own "plan"); "" when a table does not say. */
  readonly plan: string;
  readonly nodes: number;
  readonly sids: number;
}

const touchText = (t: Touch) => (t.kind === "node" ? `node ${t.name}` : `${t.kind} ${t.name}`);

function sidText(s: SidEntry): string {
  const fl = s.flavors.length ? ` (${s.flavors.join("+")})` : "";
  const ctx = Object.keys(s.context).filter((k) => k !== "link");
  const c = ctx.length ? ` ${ctx.sort().map((k) => `${k}=${s.context[k]}`).join(" ")}` : "";
  const algo = s.algorithm !== 0 ? ` algorithm ${s.algorithm}` : "";
  return `${formatAddr(s.sid)} ${s.behavior}${fl}${algo}${c}`;
}

function fieldValue(s: SidEntry, f: SidChange["fields"][number]): string {
  switch (f) {
    case "behavior":
      return s.behavior;
    case "flavors":
      return s.flavors.length ? s.flavors.join("+") : "none";
    case "codepoint":
      return s.codepoint === undefined ? "none" : String(s.codepoint);
    case "structure":
      return s.structure ? `${s.structure.block}/${s.structure.node}/${s.structure.function}/${s.structure.argument}` : "none";
    case "context":
      return `${s.algorithm !== 0 ? `algorithm=${s.algorithm};` : ""}${formatContext(Object.fromEntries(Object.entries(s.context).filter(([k]) => k !== "link"))) || "none"}`;
    case "locator":
      return s.locator ? s.locator.format() : "none";
  }
}

function sidLine(c: SidChange): string {
  const touches = ` [${c.touches.map(touchText).join(", ")}]`;
  const fields = (o: SidEntry, n: SidEntry) => c.fields.map((f) => `${f} ${fieldValue(o, f)} -> ${fieldValue(n, f)}`).join("; ");
  switch (c.kind) {
    case "added":
      return `  + sid ${sidText(c.new!)}${touches}`;
    case "removed":
      return `  - sid ${sidText(c.old!)}${touches}`;
    case "renumbered": {
      const extra = c.fields.length ? `; ${fields(c.old!, c.new!)}` : "";
      return `  ~ renumbered ${sidText(c.old!).replace(/^\S+ /, "")}: ${formatAddr(c.old!.sid)} -> ${formatAddr(c.new!.sid)}${extra}${touches}`;
    }
    case "changed":
      return `  ! changed at ${formatAddr(c.new!.sid)}: ${fields(c.old!, c.new!)}${touches}`;
  }
}

const locText = (l: LocatorEntry) => `${l.prefix.format()} (algorithm ${l.algorithm}${l.anycast ? `, anycast ${l.anycast}` : ""})`;

function locatorLine(c: LocatorChange): string {
  if (c.kind === "added") return `  + locator ${locText(c.new!)}`;
  if (c.kind === "removed") return `  - locator ${locText(c.old!)}`;
  return `  ~ renumbered locator ${c.old!.prefix.format()} -> ${c.new!.prefix.format()} (algorithm ${c.old!.algorithm}${c.old!.anycast ? `, anycast ${c.old!.anycast}` : ""})`;
}

function sideText(label: string, s: DiffSide): string {
  const what = s.kind === "plan" ? `plan ${s.plan} with its lock` : `${s.kind === "csv" ? "CSV" : "JSON"} table${s.plan ? ` of plan ${s.plan}` : ""}`;
  const n = (count: number, noun: string) => `${count} ${noun}${count === 1 ? "" : "s"}`;
  return `${label} ${s.file}: ${what}, ${n(s.nodes, "node")}, ${n(s.sids, "SID")}`;
}

/**
 * The diff as text: where both sides came from, a summary table (one row per node that changed
 * and a total), one line per change, and a closing verdict. `accepted` says whether disruptive
 * changes were accepted on the command line.
 */
export function diffText(d: TableDiff, old: DiffSide, next: DiffSide, accepted: boolean): string {
  const out: string[] = [sideText("old", old), sideText("new", next)];
  const k = d.counts;
  if (d.nodes.length === 0) {
    out.push(`no differences: ${k.sidsUnchanged} SIDs are the same in both`);
    return out.join("\n") + "\n";
  }
  const t = new Table({ head: ["node", "status", "locators +/-/~", "SIDs +", "SIDs -", "renumbered", "changed", "touches"], style: { head: [], border: [] } });
  const n = (xs: readonly { kind: string }[], kind: string) => xs.filter((x) => x.kind === kind).length;
  for (const nd of d.nodes) {
    const touches = nd.touches.filter((x) => x.kind !== "node").map(touchText);
    t.push([
      nd.node,
      nd.status,
      `${n(nd.locators, "added")}/${n(nd.locators, "removed")}/${n(nd.locators, "renumbered")}`,
      String(n(nd.sids, "added")),
      String(n(nd.sids, "removed")),
      String(n(nd.sids, "renumbered")),
      String(n(nd.sids, "changed")),
      touches.length > 6 ? `${touches.slice(0, 6).join(", ")} and ${touches.length - 6} more` : touches.join(", "),
    ]);
  }
  t.push([
    `total (${d.nodes.length} node${d.nodes.length === 1 ? "" : "s"})`,
    "",
    `${k.locatorsAdded}/${k.locatorsRemoved}/${k.locatorsRenumbered}`,
    String(k.sidsAdded),
    String(k.sidsRemoved),
    String(k.sidsRenumbered),
    String(k.sidsChanged),
    `${k.sidsUnchanged} SIDs unchanged`,
  ]);
  out.push(t.toString());
  for (const nd of d.nodes) {
    out.push(`node ${nd.node}${nd.status === "changed" ? "" : ` (${nd.status === "added" ? "new node" : "node gone"})`}`);
    for (const l of nd.locators) out.push(locatorLine(l));
    for (const s of nd.sids) out.push(sidLine(s));
  }
  if (!d.disruptive) out.push("only additions: nothing that exists moves");
  else {
    const parts = (
      [
        [k.sidsRemoved, "SID", "removed"],
        [k.sidsRenumbered, "SID", "renumbered"],
        [k.sidsChanged, "SID", "changed"],
        [k.locatorsRemoved, "locator", "removed"],
        [k.locatorsRenumbered, "locator", "renumbered"],
      ] as const
    )
      .filter(([c]) => c > 0)
      .map(([c, noun, verb]) => `${c} ${noun}${c === 1 ? "" : "s"} ${verb}`);
    out.push(`disruptive: ${parts.join(", ")}; ${accepted ? "accepted with --accept-disruption" : "review before rollout (--accept-disruption exits 0)"}`);
  }
  return out.join("\n") + "\n";
}

function sidJson(s: SidEntry): Record<string, unknown> {
  return {
    sid: formatAddr(s.sid),
    behavior: s.behavior,
    flavors: [...s.flavors],
    codepoint: s.codepoint ?? null,
    algorithm: s.algorithm,
    locator: s.locator ? s.locator.format() : null,
    structure: s.structure ? { block: s.structure.block, node: s.structure.node, function: s.structure.function, argument: s.structure.argument } : null,
    context: Object.fromEntries(Object.keys(s.context).sort().map((k) => [k, s.context[k]])),
  };
}

const locJson = (l: LocatorEntry | undefined) => (l ? { prefix: l.prefix.format(), algorithm: l.algorithm, anycast: l.anycast === "" ? null : l.anycast } : null);

/** The diff as JSON (`sidcarve/diff/v1`, schemas/diff.schema.json), two-space indent, trailing newline. */
export function diffJson(d: TableDiff, old: DiffSide, next: DiffSide, accepted: boolean): string {
  return (
    JSON.stringify(
      {
        schema: DIFF_SCHEMA_ID,
        old,
        new: next,
        disruptive: d.disruptive,
        accepted: d.disruptive && accepted,
        counts: d.counts,
        nodes: d.nodes.map((n) => ({
          node: n.node,
          status: n.status,
          touches: n.touches,
          locators: n.locators.map((l) => ({ change: l.kind, old: locJson(l.old), new: locJson(l.new) })),
          sids: n.sids.map((s) => ({ change: s.kind, binding: s.binding, fields: s.fields, touches: s.touches, old: s.old ? sidJson(s.old) : null, new: s.new ? sidJson(s.new) : null })),
        })),
      },
      null,
      2,
    ) + "\n"
  );
}
