/**
 * Plan loading from text: decode, parse with positions, validate against the schema, normalise.
 * Pure (the caller reads the bytes); every failure is a list of located diagnostics.
 */
import type { Diagnostic } from "./diagnostic.js";
import type { Plan } from "./model.js";
import { normalizePlan } from "./normalize.js";
import { decodeUtf8, type ParseOptions, parseSource, validatePlanData } from "./source.js";

export type LoadResult = { ok: true; plan: Plan } | { ok: false; diagnostics: Diagnostic[] };

/** Load a plan from raw bytes (UTF-8, optional BOM, LF or CRLF). */
export function loadPlanBytes(bytes: Uint8Array, file: string, options?: ParseOptions): LoadResult {
  const d = decodeUtf8(bytes, file);
  if (!d.ok) return d;
  return loadPlanText(d.text, file, options);
}

/** Load a plan from text. `options.fast: false` parses with the yaml library alone (for tests). */
export function loadPlanText(text: string, file: string, options?: ParseOptions): LoadResult {
  const src = parseSource(text, file, options);
  if (!src.ok) return src;
  if (src.data === null || typeof src.data !== "object" || Array.isArray(src.data)) {
    return { ok: false, diagnostics: [{ code: "schema/type", message: "a plan is a mapping of keys (sidcarve, plan, blocks, levels, nodes, ...), not a list or a single value", location: src.locate([]) }] };
  }
  const schemaErrors = validatePlanData(src.data, src.locate);
  if (schemaErrors.length > 0) return { ok: false, diagnostics: schemaErrors };
  return normalizePlan(src.data as Record<string, unknown>, file, src.locate);
}
