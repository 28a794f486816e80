/**
 * The lint engine: prepares sorted views of the input once, runs every rule that is switched on,
 * applies configured severities and waivers, and returns the findings sorted.
 */
import type { SourceLocation } from "../plan/diagnostic.js";
import type { Severity } from "../plan/model.js";
import type { Finding, FindingSeverity, LintInput, OwnedLocator, OwnedSid, Report, Rule, RuleContext } from "./types.js";
import { SEVERITY_RANK } from "./types.js";

export interface LintResult {
  readonly findings: readonly Finding[];
  /** Findings suppressed by a valid waiver. */
  readonly waived: readonly Finding[];
  readonly rulesRun: readonly string[];
  readonly counts: Readonly<Record<FindingSeverity, number>>;
}

export interface LintOptions {
  /** Severity overrides (rule id -> severity), on top of the plan's lint.severity. */
  readonly severity?: Readonly<Record<string, Severity>>;
  /** Run only these rules. */
  readonly only?: readonly string[];
}

/** Compare two bigints for sorting. */
const cmpBig = (a: bigint, b: bigint) => (a < b ? -1 : a > b ? 1 : 0);

/** Sorted views shared by all rules (built once per run: n log n). */
export function prepare(input: LintInput): { locators: OwnedLocator[]; sids: OwnedSid[] } {
  const locators: OwnedLocator[] = [];
  const sids: OwnedSid[] = [];
  for (const n of input.table.nodes) {
    for (const l of n.locators) locators.push({ node: n.node, entry: l });
    for (const s of n.sids) sids.push({ node: n.node, entry: s });
  }
  locators.sort((a, b) => cmpBig(a.entry.prefix.first, b.entry.prefix.first) || a.entry.prefix.len - b.entry.prefix.len || (a.node < b.node ? -1 : a.node > b.node ? 1 : 0));
  sids.sort((a, b) => cmpBig(a.entry.sid, b.entry.sid) || (a.node < b.node ? -1 : a.node > b.node ? 1 : 0));
  return { locators, sids };
}

/** Run the rules over the input. A rule that throws is a programmer error and is re-thrown with its id. */
export function runLint(input: LintInput, rules: readonly Rule[], options: LintOptions = {}): LintResult {
  const { locators, sids } = prepare(input);
  const planSeverity = input.plan?.lint.severity ?? {};
  const nodeIndex = new Map(input.plan?.nodes.map((n) => [n.name, n.index]) ?? []);
  const firstRow = new Map<string, number>();
  for (const n of input.table.nodes) {
    const r = n.sids.find((s) => s.row !== undefined)?.row;
    if (r !== undefined) firstRow.set(n.node, r);
  }
  const locatePlan = (path: readonly (string | number)[]): SourceLocation => (input.plan ? input.plan.locate(path) : { file: input.file });
  const locateNode = (node: string): SourceLocation => {
    if (input.fromTable) {
      const row = firstRow.get(node);
      return row !== undefined ? { file: input.file, row, line: input.lineOf?.(row), field: "node" } : { file: input.file };
    }
    const i = nodeIndex.get(node);
    if (i !== undefined) return locatePlan(["nodes", i]);
    const a = input.plan?.anycast.findIndex((x) => `anycast:${x.name}` === node || x.name === node) ?? -1;
    return a >= 0 ? locatePlan(["anycast", a]) : { file: input.file };
  };
  const locateSid = (s: OwnedSid): SourceLocation => (s.entry.row !== undefined ? { file: input.file, row: s.entry.row, line: input.lineOf?.(s.entry.row) } : locateNode(s.node));

  const findings: Finding[] = [];
  const rulesRun: string[] = [];
  for (const rule of rules) {
    const id = rule.meta.id;
    if (options.only && !options.only.includes(id)) continue;
    if (rule.meta.needs === "plan" && !input.plan) continue;
    const sev = options.severity?.[id] ?? planSeverity[id] ?? rule.meta.severity;
    if (sev === "off") continue;
    rulesRun.push(id);
    const ctx: RuleContext = {
      input,
      locators,
      sids,
      locateNode,
      locateSid,
      locatePlan,
      report(r: Report) {
        findings.push({
          rule: id,
          severity: sev,
          message: r.message,
          location: r.location ?? { file: input.file },
          objects: [...r.objects],
          hint: r.hint ?? "",
          data: r.data ?? {},
        });
      },
    };
    try {
      rule.check(ctx);
    } catch (e) {
      throw new Error(`lint rule ${id} failed: ${(e as Error)?.stack ?? String(e)}`);
    }
  }

  // Waivers: a valid (unexpired) waiver of the rule that names one of the finding's objects suppresses it.
  const waivers = (input.plan?.lint.waivers ?? []).filter((w) => w.expires >= input.today);
  const kept: Finding[] = [];
  const waived: Finding[] = [];
  for (const f of findings) {
    const w = waivers.find((x) => x.rule === f.rule && f.objects.some((o) => x.objects.includes(o)));
    (w ? waived : kept).push(f);
  }
  kept.sort(compareFindings);
  waived.sort(compareFindings);
  const counts = { info: 0, warning: 0, error: 0 };
  for (const f of kept) counts[f.severity]++;
  return { findings: kept, waived, rulesRun, counts };
}

/** Order: most severe first, then by place in the file, then rule and message. */
export function compareFindings(a: Finding, b: Finding): number {
  return (
    SEVERITY_RANK[b.severity] - SEVERITY_RANK[a.severity] ||
    (a.location.file < b.location.file ? -1 : a.location.file > b.location.file ? 1 : 0) ||
    (a.location.line ?? 0) - (b.location.line ?? 0) ||
    (a.location.row ?? 0) - (b.location.row ?? 0) ||
    (a.rule < b.rule ? -1 : a.rule > b.rule ? 1 : 0) ||
    (a.message < b.message ? -1 : a.message > b.message ? 1 : 0)
  );
}

/** Exit code for --fail-on: 1 when a finding at or above the level remains, else 0. */
export function failExitCode(result: LintResult, failOn: FindingSeverity): 0 | 1 {
  return result.findings.some((f) => SEVERITY_RANK[f.severity] >= SEVERITY_RANK[failOn]) ? 1 : 0;
}
