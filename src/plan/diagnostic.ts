/**
 * Input problems as values: a stable code, a plain message that quotes the bad value and says
 * what is allowed, and where it is (file, line, column, path in the plan).
 */

/** Where a problem sits. Line and column are 1-based; `path` is the JSON path inside the plan. */
export interface SourceLocation {
  readonly file: string;
  readonly line?: number;
  readonly column?: number;
  /** e.g. ["nodes", 3, "place"]; rendered as nodes[3].place */
  readonly path?: readonly (string | number)[];
  /** For table inputs: 1-based data row and column name. */
  readonly row?: number;
  readonly field?: string;
}

/** One input error. `code` is stable (tests assert it); `message` is for people. */
export interface Diagnostic {
  readonly code: string;
  readonly message: string;
  readonly location: SourceLocation;
}

/** Render a path like nodes[3].place (empty for the document root). */
export function formatPath(path: readonly (string | number)[] | undefined): string {
  if (!path || path.length === 0) return "";
  let out = "";
  for (const p of path) {
    if (typeof p === "number") out += `[${p}]`;
    else if (/^[A-Za-z_][\w-]*$/.test(p)) out += out === "" ? p : `.${p}`;
    else out += `[${JSON.stringify(p)}]`;
  }
  return out;
}

/** `file:line:column` (or `file:row N`) plus the plan path, for messages. */
export function formatLocation(loc: SourceLocation): string {
  let s = loc.file;
  if (loc.line !== undefined) s += `:${loc.line}${loc.column !== undefined ? `:${loc.column}` : ""}`;
  if (loc.row !== undefined) s += ` (row ${loc.row}${loc.field ? `, column ${loc.field}` : ""})`;
  const p = formatPath(loc.path);
  if (p) s += ` (${p})`;
  return s;
}

/** One line per diagnostic: `file:line:col (path): message [code]`. */
export function formatDiagnostic(d: Diagnostic): string {
  return `${formatLocation(d.location)}: ${d.message} [${d.code}]`;
}

/** A thrown bundle of diagnostics, used only to unwind from deep inside a loader to its edge. */
export class InputError extends Error {
  readonly diagnostics: readonly Diagnostic[];
  constructor(diagnostics: readonly Diagnostic[]) {
    super(diagnostics.map(formatDiagnostic).join("\n"));
    this.diagnostics = diagnostics;
  }
}

/** Quote a user value for a message, shortened when long. */
export function quote(v: unknown): string {
  let s: string;
  try {
    s = typeof v === "string" ? JSON.stringify(v) : typeof v === "bigint" ? v.toString() : JSON.stringify(v) ?? String(v);
  } catch {
    s = String(v);
  }
  return s.length > 80 ? s.slice(0, 77) + "..." : s;
}
