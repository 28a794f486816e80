/**
 * `sidcarve diff OLD NEW`: what moves between two SID tables, each a plan (with its lock) or a
 * CSV/JSON SID table. Exit 0 for only additions, 1 when anything is removed, renumbered or
 * changed (unless --accept-disruption), 2 on bad input.
 */
import { extname } from "node:path";
import { diffExitCode, diffTables } from "../../diff/diff.js";
import { type DiffSide, diffJson, diffText } from "../../diff/render.js";
import type { Diagnostic } from "../../plan/diagnostic.js";
import { decodeUtf8 } from "../../plan/source.js";
import type { SidTable } from "../../sid/table.js";
import { type ReadTableResult, readCsvTable, readJsonTable } from "../../sid/table-read.js";
import type { Io } from "../context.js";
import { UsageError, readInput } from "../io.js";
import { inputKind } from "./lint.js";
import { loadPlanFile, lockPathFor, lockedAllocation } from "../plan-files.js";

export interface DiffFlags {
  readonly oldLock?: string;
  readonly newLock?: string;
  readonly format?: string;
  readonly acceptDisruption?: boolean;
}

const PLAN_EXTENSIONS = [".yaml", ".yml", ".json"];
const SID_TABLE_SCHEMA_ID = "sidcarve/sid-table/v1";
/** Row problems listed before the rest are only counted. */
const MAX_LISTED = 20;

/** Table row problems as located diagnostics (row and column, and the line for CSV). */
function rowDiagnostics(file: string, read: ReadTableResult): Diagnostic[] {
  return read.problems.slice(0, MAX_LISTED).map((p) => {
    const line = read.lineOf?.(p.row);
    return {
      code: read.unreadable ? "table/unreadable" : "table/row",
      message: p.value && !p.message.includes(p.value) ? `${p.message} (${JSON.stringify(p.value.slice(0, 60))})` : p.message,
      location: { file, ...(line !== undefined ? { line } : {}), row: p.row, ...(p.field ? { field: p.field } : {}) },
    };
  });
}

function readTable(file: string, kind: "csv" | "json-table", text: string): SidTable {
  const read = kind === "csv" ? readCsvTable(text) : readJsonTable(text);
  if (read.problems.length > 0) {
    const more = read.problems.length > MAX_LISTED ? ` (the first ${MAX_LISTED} are shown)` : "";
    // A diff over a half-read table would show the unread rows as removed: refuse instead.
    throw new UsageError(
      `${file}: ${read.unreadable ? "not a SID table" : `${read.problems.length} row${read.problems.length === 1 ? "" : "s"} cannot be read${more}; fix ${read.problems.length === 1 ? "it" : "them"} (sidcarve lint ${file} explains each) before comparing`}`,
      rowDiagnostics(file, read),
    );
  }
  return read.table;
}

/** Read one side: a CSV table, a JSON SID table, or a plan with its lock (by extension and content). */
function loadSide(file: string, lock: string | undefined, lockOption: string): { table: SidTable; side: DiffSide } {
  const ext = extname(file).toLowerCase();
  if (ext !== ".csv" && !PLAN_EXTENSIONS.includes(ext)) {
    throw new UsageError(`${file}: cannot tell what it is from its name; give a plan (.yaml, .yml, .json) or a SID table (.csv, or .json with "schema": "${SID_TABLE_SCHEMA_ID}")`);
  }
  const bytes = readInput(file);
  // the same test as `sidcarve lint`: by extension, and for .json by the "schema" near its start
  const kind: DiffSide["kind"] = inputKind(file, bytes);
  let text: string | undefined;
  if (kind !== "plan") {
    const d = decodeUtf8(bytes, file);
    if (!d.ok) throw new UsageError(`${file}: cannot be read`, d.diagnostics);
    text = d.text;
  } else if (ext === ".json" && /"schema"\s*:\s*"sidcarve\/lock\//.test(Buffer.from(bytes.subarray(0, 4096)).toString("utf8"))) {
    throw new UsageError(`${file}: is a lock file; give the plan it belongs to (its lock is found beside it, or with ${lockOption})`);
  }
  if (kind !== "plan") {
    if (lock) throw new UsageError(`${lockOption} is for a plan, but ${file} is a SID table`);
    const table = readTable(file, kind, text!);
    return { table, side: { file, kind, plan: table.plan, nodes: table.nodes.length, sids: table.nodes.reduce((s, n) => s + n.sids.length, 0) } };
  }
  const plan = loadPlanFile(file);
  const a = lockedAllocation(plan, lockPathFor(file, lock));
  const table = a.table;
  return { table, side: { file, kind, plan: plan.name, nodes: table.nodes.length, sids: table.nodes.reduce((s, n) => s + n.sids.length, 0) } };
}

export function runDiff(oldFile: string, newFile: string, flags: DiffFlags, io: Io): number {
  if (flags.format !== undefined && flags.format !== "text" && flags.format !== "json") throw new UsageError(`--format ${JSON.stringify(flags.format)} is not allowed; use text or json`);
  const old = loadSide(oldFile, flags.oldLock, "--old-lock");
  const next = loadSide(newFile, flags.newLock, "--new-lock");
  const d = diffTables(old.table, next.table);
  const accepted = flags.acceptDisruption === true;
  io.out(flags.format === "json" ? diffJson(d, old.side, next.side, accepted) : diffText(d, old.side, next.side, accepted));
  return diffExitCode(d, accepted);
}
