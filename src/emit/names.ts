/**
 * Safe file names and spreadsheet-safe cells for names that come from a plan.
 */
import { createHash } from "node:crypto";

const RESERVED_DEVICE = /^(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?$/i;

/**
 * A file name for a node: letters, digits, '.', '_' and '-' only, never "." or "..", never a
 * reserved device name, at most 100 characters. When anything had to change, a short hash of
 * the original name is appended so that two different names never map to one file.
 */
export function safeFileName(name: string): string {
  let s = name.replace(/[^A-Za-z0-9._-]/g, "_").replace(/^\.+/, "_");
  if (s === "" || RESERVED_DEVICE.test(s)) s = `_${s}`;
  if (s.length > 100) s = s.slice(0, 100);
  if (s !== name) s = `${s}-${createHash("sha256").update(name).digest("hex").slice(0, 8)}`;
  return s;
}

/**
 * Neutralise a CSV cell that a spreadsheet would run as a formula (leading =, +, -, @, tab or
 * CR), as OWASP's CSV-injection guidance advises: prefix it with a single quote.
 */
export function neutralizeCell(v: string): string {
  return /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
}

/** RFC 4180 quoting: wrap in double quotes when the cell holds a comma, quote, CR or LF. */
export function csvCell(v: string): string {
  const s = neutralizeCell(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}
