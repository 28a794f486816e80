/**
 * The linter's vocabulary: rules with their metadata, findings, and what a rule sees of its input.
 */
import type { Allocation } from "../alloc/allocate.js";
import type { Plan, Severity } from "../plan/model.js";
import type { SourceLocation } from "../plan/diagnostic.js";
import type { LocatorEntry, SidEntry, SidTable } from "../sid/table.js";

/** Severity of a finding (a rule's severity may also be "off"). */
export type FindingSeverity = Exclude<Severity, "off">;

export const SEVERITY_RANK: Readonly<Record<FindingSeverity, number>> = { info: 0, warning: 1, error: 2 };

/** Rule metadata, as ESLint keeps it beside each rule. */
export interface RuleMeta {
  /** Our own id, kebab-case, equal to the rule's file name. */
  readonly id: string;
  readonly severity: FindingSeverity;
  /** One line, imperative. */
  readonly summary: string;
  /** Why it matters to a network. */
  readonly rationale: string;
  /** The published source: RFC and section, IANA registry, or "common practice". */
  readonly source: string;
  /** What inputs the rule can judge: a plan (with intent) and/or a bare SID table. */
  readonly needs: "table" | "plan";
}

/** A problem found by a rule. */
export interface Finding {
  readonly rule: string;
  readonly severity: FindingSeverity;
  readonly message: string;
  readonly location: SourceLocation;
  /** Names of the objects involved: nodes, SIDs, prefixes, groups. */
  readonly objects: readonly string[];
  readonly hint: string;
  /** Values the message quotes, for machines (and tests). */
  readonly data: Readonly<Record<string, string | number>>;
}

/** What a rule reports; the engine adds rule id and severity. */
export interface Report {
  readonly message: string;
  readonly location?: SourceLocation;
  readonly objects: readonly string[];
  readonly hint?: string;
  readonly data?: Readonly<Record<string, string | number>>;
  /**
   * Raise or lower this finding's severity (e.g. documentation space in a production plan).
   * Applies only when neither the plan nor the caller configured the rule's severity.
   */
  readonly severity?: FindingSeverity;
}

/** One locator with its owner, as rules see it. */
export interface OwnedLocator {
  readonly node: string;
  readonly entry: LocatorEntry;
}

/** One SID with its owner. */
export interface OwnedSid {
  readonly node: string;
  readonly entry: SidEntry;
}

/** The input of a lint run. */
export interface LintInput {
  readonly table: SidTable;
  /** The file the table came from (plan or table). */
  readonly file: string;
  /** Intent, when known: a plan (linted itself) or the --plan given with a table. */
  readonly plan?: Plan;
  /** The allocation, when the input is a plan. */
  readonly allocation?: Allocation;
  /** True when the input is a SID table (inventory) rather than a plan's allocation. */
  readonly fromTable: boolean;
  /** Problems found while reading table rows; reported by the table-row rule. */
  readonly rowProblems: readonly RowProblem[];
  /** "Today" (YYYY-MM-DD) for waiver expiry. */
  readonly today: string;
  /** Line of a table row in its file, when known (CSV). */
  readonly lineOf?: (row: number) => number | undefined;
}

/** A table row that could not be read in full. */
export interface RowProblem {
  readonly row: number;
  readonly field: string;
  readonly message: string;
  readonly value: string;
}

/** What a rule gets: the input, shared sorted views, location helpers and report(). */
export interface RuleContext {
  readonly input: LintInput;
  /** All locators, sorted by first address then length. */
  readonly locators: readonly OwnedLocator[];
  /** All SIDs, sorted by address then node. */
  readonly sids: readonly OwnedSid[];
  report(r: Report): void;
  /** Location of a node (plan path, or first table row of the node). */
  locateNode(node: string): SourceLocation;
  /** Location of a SID (table row, or the node in the plan). */
  locateSid(s: OwnedSid): SourceLocation;
  /**
   * Location of SID `i` of the packed table (`ctx.packed.table`): its table row, or its node in
   * the plan. Gives what locateSid gives for the same SID.
   */
  locateSidAt(i: number): SourceLocation;
  /** Location of a plan path (file only when there is no plan). */
  locatePlan(path: readonly (string | number)[]): SourceLocation;
  /**
   * A value computed once per lint run and shared by every rule that asks with the same key
   * (e.g. the subjects the space rules all judge). `make` must be pure: it sees the same input.
   */
  shared<T>(key: string, make: () => T): T;
}

export interface Rule {
  readonly meta: RuleMeta;
  check(ctx: RuleContext): void;
}
