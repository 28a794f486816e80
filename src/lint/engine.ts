/**
 * The lint engine: prepares sorted views of the input once, runs every rule that is switched on,
 * applies configured severities and waivers, and returns the findings sorted.
 *
 * The views are made lazily, when the first rule asks for them: `ctx.packed` (the SID table in
 * columns with its sorted orders) and the object views `ctx.sids` / `ctx.locators`, which are
 * materialised from the packed orders when the input came packed (a CSV table, an allocation), and
 * sorted by `prepare` when it came as objects (a table built by hand). A rule that touches none
 * costs nothing.
 */
import type { Plan, Severity } from "../plan/model.js";
import type { SourceLocation } from "../plan/diagnostic.js";
import { type PackedReadResult, type PackedSidTable, locatorOrder, packTable, sidOrder } from "../sid/packed.js";
import type { SidTable } from "../sid/table.js";
import type { Finding, FindingSeverity, LintInput, OwnedLocator, OwnedSid, Report, Rule, RuleContext } from "./types.js";
import { SEVERITY_RANK } from "./types.js";

/** The packed view every rule may use instead of the object views (same content, same order). */
export interface PackedLintView {
  /** The SIDs and locators in columns (see src/sid/packed.ts). */
  readonly table: PackedSidTable;
  /** SID indices in the order of `ctx.sids`: by address, then node name, then source order. */
  readonly sidOrder: Int32Array;
  /** Locator ids in the order of `ctx.locators`: by first address, length, node name, first appearance. */
  readonly locatorOrder: Int32Array;
}

declare module "./types.js" {
  interface LintInput {
    /** The table in columns, when the input was read that way (readCsvPacked); `table` is then made from it on demand. */
    readonly packed?: PackedSidTable;
  }
  interface RuleContext {
    /** The packed view of the input (made on first use; shared by every rule of the run). */
    readonly packed: PackedLintView;
  }
}

/** Lint input for a table read by readCsvPacked; `table` (objects) is only made if a rule asks for it (inputFromAllocation does the same for an allocation). */
export function inputFromPacked(read: PackedReadResult, file: string, today: string, plan?: Plan): LintInput {
  const packed = read.table;
  return {
    get table(): SidTable {
      return packed.toTable();
    },
    file,
    plan,
    fromTable: true,
    rowProblems: read.problems,
    today,
    lineOf: read.lineOf,
    packed,
  };
}

export interface LintResult {
  readonly findings: readonly Finding[];
  /** Findings suppressed by a valid waiver. */
  readonly waived: readonly Finding[];
  readonly rulesRun: readonly string[];
  /**
   * Whether a rule asked for the object views (ctx.sids / ctx.locators). For a packed table input
   * this should stay false: the object views cost hundreds of bytes per SID.
   */
  readonly objectViewsMade: boolean;
  readonly counts: Readonly<Record<FindingSeverity, number>>;
}

export interface LintOptions {
  /** Severity overrides (rule id -> severity), on top of the plan's lint.severity. */
  readonly severity?: Readonly<Record<string, Severity>>;
  /** Run only these rules. */
  readonly only?: readonly string[];
  /**
   * Called after each rule with its time in milliseconds (for the benchmark). The one-off cost
   * of the shared views is reported separately, under the id "(views)".
   */
  readonly onRuleTimed?: (ruleId: string, ms: number) => void;
}

/** Compare two bigints for sorting. */
const cmpBig = (a: bigint, b: bigint) => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Sorted views shared by all rules, by comparator sorts over objects (n log n bigint comparisons).
 * This is the order every view follows: the engine uses it directly for inputs that came as
 * objects, and tests check the packed orders (radix sorts on the packed columns) against it.
 */
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

/**
 * The shared views of one run, each made on first use. `viewMs` accumulates the time spent making
 * them (so per-rule timing can leave it out).
 */
export class LintViews {
  private packedView: PackedLintView | undefined;
  private sidList: OwnedSid[] | undefined;
  private locatorList: OwnedLocator[] | undefined;
  private readonly memo = new Map<string, unknown>();
  viewMs = 0;

  constructor(private readonly input: LintInput) {}

  /** Depth of view-making in progress: a view made while making another is counted once, by the outer one. */
  private depth = 0;

  private timed<T>(make: () => T): T {
    if (this.depth > 0) return make();
    const t0 = performance.now();
    this.depth++;
    try {
      return make();
    } finally {
      this.depth--;
      this.viewMs += performance.now() - t0;
    }
  }

  get packed(): PackedLintView {
    if (!this.packedView) {
      this.packedView = this.timed(() => {
        const table = this.input.packed ?? packTable(this.input.table);
        return { table, sidOrder: sidOrder(table), locatorOrder: locatorOrder(table) };
      });
    }
    return this.packedView;
  }

  /**
   * An input that came as objects (a table built by hand) gets its object views from `prepare`: its
   * tables are nearly sorted already, which a comparator sort exploits, and packing would cost
   * more than it saves. The packed view is then only made when a rule asks for it.
   */
  private fromObjects(): void {
    const r = this.timed(() => prepare(this.input));
    this.sidList = r.sids;
    this.locatorList = r.locators;
  }

  /** A value shared by the rules of this run (see RuleContext.shared); its time counts as views. */
  shared<T>(key: string, make: () => T): T {
    if (!this.memo.has(key)) this.memo.set(key, this.timed(make));
    return this.memo.get(key) as T;
  }

  /** Whether the object views (`sids`, `locators`) were made: a packed table input should never need them. */
  get objectViewsMade(): boolean {
    return this.sidList !== undefined || this.locatorList !== undefined;
  }

  /** All SIDs sorted by address then node (the order of `prepare`). */
  get sids(): OwnedSid[] {
    if (!this.sidList && !this.input.packed) this.fromObjects();
    if (!this.sidList) {
      const v = this.packed;
      this.sidList = this.timed(() => {
        const t = v.table;
        const order = v.sidOrder;
        const out = new Array<OwnedSid>(order.length);
        for (let k = 0; k < order.length; k++) {
          const i = order[k]!;
          out[k] = { node: t.nodeNames[t.node[i]!]!, entry: t.entry(i) };
        }
        return out;
      });
    }
    return this.sidList;
  }

  /** All locators sorted by first address, length, node (the order of `prepare`). */
  get locators(): OwnedLocator[] {
    if (!this.locatorList && !this.input.packed) this.fromObjects();
    if (!this.locatorList) {
      const v = this.packed;
      this.locatorList = this.timed(() => {
        const t = v.table;
        return Array.from(v.locatorOrder, (id) => ({ node: t.nodeNames[t.locNode[id]!]!, entry: t.locatorEntry(id) }));
      });
    }
    return this.locatorList;
  }
}

/** Run the rules over the input. A rule that throws is a programmer error and is re-thrown with its id. */
export function runLint(input: LintInput, rules: readonly Rule[], options: LintOptions = {}): LintResult {
  const views = new LintViews(input);
  const planSeverity = input.plan?.lint.severity ?? {};
  const nodeIndex = new Map(input.plan?.nodes.map((n) => [n.name, n.index]) ?? []);
  // first table row of each node, for locating node findings in a table (made on first use)
  let firstRowMap: Map<string, number> | undefined;
  const firstRow = (): Map<string, number> => {
    if (firstRowMap) return firstRowMap;
    firstRowMap = new Map();
    const p = input.packed;
    if (p) {
      // first row per node id in one pass over the columns, then one map entry per node
      const first = new Int32Array(p.nodeNames.length);
      for (let i = 0; i < p.count; i++) if (first[p.node[i]!] === 0 && p.row[i]! > 0) first[p.node[i]!] = p.row[i]!;
      for (let id = 0; id < first.length; id++) if (first[id]! > 0) firstRowMap.set(p.nodeNames[id]!, first[id]!);
    } else {
      for (const n of input.table.nodes) {
        const r = n.sids.find((s) => s.row !== undefined)?.row;
        if (r !== undefined) firstRowMap.set(n.node, r);
      }
    }
    return firstRowMap;
  };
  const locatePlan = (path: readonly (string | number)[]): SourceLocation => (input.plan ? input.plan.locate(path) : { file: input.file });
  const locateNode = (node: string): SourceLocation => {
    if (input.fromTable) {
      const row = firstRow().get(node);
      return row !== undefined ? { file: input.file, row, line: input.lineOf?.(row), field: "node" } : { file: input.file };
    }
    const i = nodeIndex.get(node);
    if (i !== undefined) return locatePlan(["nodes", i]);
    const a = input.plan?.anycast.findIndex((x) => `anycast:${x.name}` === node || x.name === node) ?? -1;
    return a >= 0 ? locatePlan(["anycast", a]) : { file: input.file };
  };
  const locateSid = (s: OwnedSid): SourceLocation => (s.entry.row !== undefined ? { file: input.file, row: s.entry.row, line: input.lineOf?.(s.entry.row) } : locateNode(s.node));
  const locateSidAt = (i: number): SourceLocation => {
    const t = views.packed.table;
    const row = t.row[i]!;
    return row > 0 ? { file: input.file, row, line: input.lineOf?.(row) } : locateNode(t.nodeNames[t.node[i]!]!);
  };

  const findings: Finding[] = [];
  const rulesRun: string[] = [];
  for (const rule of rules) {
    const id = rule.meta.id;
    if (options.only && !options.only.includes(id)) continue;
    if (rule.meta.needs === "plan" && !input.plan) continue;
    const configured = options.severity?.[id] ?? planSeverity[id];
    const sev = configured ?? rule.meta.severity;
    if (sev === "off") continue;
    rulesRun.push(id);
    const ctx: RuleContext = {
      input,
      get locators() {
        return views.locators;
      },
      get sids() {
        return views.sids;
      },
      get packed() {
        return views.packed;
      },
      locateNode,
      locateSid,
      locateSidAt,
      locatePlan,
      shared: (key, make) => views.shared(key, make),
      report(r: Report) {
        findings.push({
          rule: id,
          severity: configured === undefined && r.severity ? r.severity : sev,
          message: r.message,
          location: r.location ?? { file: input.file },
          objects: [...r.objects],
          hint: r.hint ?? "",
          data: r.data ?? {},
        });
      },
    };
    const v0 = views.viewMs;
    const t0 = options.onRuleTimed ? performance.now() : 0;
    try {
      rule.check(ctx);
    } catch (e) {
      throw new Error(`lint rule ${id} failed: ${(e as Error)?.stack ?? String(e)}`);
    }
    if (options.onRuleTimed) {
      const viewPart = views.viewMs - v0;
      options.onRuleTimed(id, performance.now() - t0 - viewPart);
      if (viewPart > 0) options.onRuleTimed("(views)", viewPart);
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
  return { findings: kept, waived, rulesRun, counts, objectViewsMade: views.objectViewsMade };
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
