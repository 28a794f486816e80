/**
 * Reading plan text (YAML or JSON) into plain data while keeping a source position for every
 * path, and turning schema errors into located diagnostics. All YAML-node code lives here.
 */
import { createRequire } from "node:module";
import type { ErrorObject, ValidateFunction } from "ajv";
import type { Node as YamlNode, Document } from "yaml";
import type * as YamlModule from "yaml";
import { type Diagnostic, type SourceLocation, quote } from "./diagnostic.js";
import { type FastPositions, fastParseWithPositions } from "./fast-yaml.js";
import { validate as generatedValidate } from "./plan-validator.generated.js";

/**
 * Maps a path inside the parsed data back to file:line:column. A scalar is located at its value;
 * a mapping or list value (which in block style starts on the line after its key) at its key, as
 * is any value when `options.key` is set (e.g. for an unknown key). A path that leaves the
 * document is located at the nearest ancestor that exists.
 */
export type Locator = (path: readonly (string | number)[], options?: { readonly key?: boolean }) => SourceLocation;

/** Parsed data with its locator, or the diagnostics that stopped parsing. */
export type SourceResult =
  | { ok: true; data: unknown; locate: Locator }
  | { ok: false; diagnostics: Diagnostic[] };

/** Largest input we read, in characters: far above any real plan, it bounds time and memory. */
export const MAX_SOURCE_CHARS = 64 * 1024 * 1024;
/** Deepest nesting accepted; plans are a handful of levels deep. */
export const MAX_DEPTH = 64;

/**
 * Decode raw bytes as UTF-8 (a leading BOM is dropped). Non-UTF-8 input is a diagnostic, not
 * a replacement character hidden in a node name.
 */
export function decodeUtf8(bytes: Uint8Array, file: string): { ok: true; text: string } | { ok: false; diagnostics: Diagnostic[] } {
  try {
    let text = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
    if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    return { ok: true, text };
  } catch {
    // one linear pass for the message (decoding ever longer prefixes would be quadratic)
    const offset = Math.max(0, firstInvalidUtf8(bytes));
    let line = 1;
    for (let i = 0; i < offset; i++) if (bytes[i] === 0x0a) line++;
    return {
      ok: false,
      diagnostics: [
        {
          code: "input/encoding",
          message: `the file is not valid UTF-8 (byte 0x${(bytes[offset] ?? 0).toString(16).padStart(2, "0")} at offset ${offset}); save it as UTF-8`,
          location: { file, line },
        },
      ],
    };
  }
}

/**
 * Offset of the first byte that starts an ill-formed UTF-8 sequence (RFC 3629 §4: no overlong
 * forms, no surrogates, nothing above U+10FFFF, no sequence cut short), or -1 when all is well.
 */
export function firstInvalidUtf8(b: Uint8Array): number {
  const n = b.length;
  let i = 0;
  while (i < n) {
    const c = b[i]!;
    if (c < 0x80) {
      i++;
      continue;
    }
    // RFC 3629 §4: the allowed range of the second byte depends on the first
    let need: number;
    let lo = 0x80;
    let hi = 0xbf;
    if (c >= 0xc2 && c <= 0xdf) need = 1;
    else if (c === 0xe0) (need = 2), (lo = 0xa0);
    else if ((c >= 0xe1 && c <= 0xec) || c === 0xee || c === 0xef) need = 2;
    else if (c === 0xed) (need = 2), (hi = 0x9f);
    else if (c === 0xf0) (need = 3), (lo = 0x90);
    else if (c >= 0xf1 && c <= 0xf3) need = 3;
    else if (c === 0xf4) (need = 3), (hi = 0x8f);
    else return i;
    for (let k = 1; k <= need; k++) {
      const x = b[i + k];
      if (x === undefined || x < (k === 1 ? lo : 0x80) || x > (k === 1 ? hi : 0xbf)) return i;
    }
    i += need + 1;
  }
  return -1;
}

/** How to parse: `fast: false` skips the fast reader (to compare against the full path). */
export interface ParseOptions {
  readonly fast?: boolean;
}

/** Parse YAML or JSON text, keeping positions. Syntax errors, duplicate keys and alias bombs become diagnostics. */
export function parseSource(text: string, file: string, options: ParseOptions = {}): SourceResult {
  if (text.length > MAX_SOURCE_CHARS) {
    return { ok: false, diagnostics: [{ code: "input/too-large", message: `the file has ${text.length} characters; at most ${MAX_SOURCE_CHARS} are read`, location: { file } }] };
  }
  if (text.includes("\u0000")) {
    const at = text.indexOf("\u0000");
    const line = text.slice(0, at).split("\n").length;
    return { ok: false, diagnostics: [{ code: "input/binary", message: "the file contains a NUL byte: it looks like binary data, not a YAML or JSON plan", location: { file, line } }] };
  }
  if (text.trim() === "") {
    return { ok: false, diagnostics: [{ code: "input/empty", message: "the file is empty; a plan needs at least sidcarve, plan, blocks, levels and nodes", location: { file, line: 1, column: 1 } }] };
  }
  // fastParse gives up on nesting deeper than MAX_DEPTH, so its data needs no depth check: the
  // full path below reports such text (walking 26 MB of plan data would cost tens of ms).
  const fast = options.fast === false ? undefined : fastParseWithPositions(text, MAX_DEPTH);
  if (fast === undefined) return parseFull(text, file);
  return { ok: true, data: fast.data, locate: fastLocator(fast.positions, file) };
}

/**
 * The Locator of parseFull's, from the positions the fast reader kept: the same walk over the
 * same nodes (a mapping entry is found by its key as a string, a list item by a number), with
 * offsets turned into lines and columns as the library's LineCounter does.
 */
function fastLocator(positions: FastPositions, file: string): Locator {
  return (path, options) => {
    let node = positions.root;
    let found = positions.start(node);
    for (let i = 0; i < path.length; i++) {
      const key = path[i]!;
      const kind = positions.kind(node);
      if (kind === "map") {
        const e = positions.entry(node, String(key));
        if (e < 0) break;
        const value = positions.value(node, e);
        // Pointing at a block mapping or list value would name the line after its key.
        const atKey = positions.kind(value) !== "scalar" || (options?.key === true && i === path.length - 1);
        found = atKey ? positions.keyStart(node, e) : value;
        node = value;
      } else if (kind === "seq" && typeof key === "number") {
        // what `items[key]` finds: integers from 0 below the length (-0 included)
        if (!Number.isInteger(key) || key < 0 || key >= positions.count(node)) break;
        node = positions.item(node, key);
        found = positions.start(node);
      } else break;
    }
    const p = positions.linePos(found);
    return { file, line: p.line, column: p.col, path: [...path] };
  };
}

/**
 * The yaml library and ajv are loaded on first use: a command that never reads a plan the slow
 * way (linting a CSV table, a plan the fast reader takes) does not pay for loading them.
 */
const require = createRequire(import.meta.url);
let yamlModule: typeof YamlModule | undefined;
const yamlLib = (): typeof YamlModule => (yamlModule ??= require("yaml") as typeof YamlModule);

/** The yaml library's parse, with a LineCounter for positions: every input that fastParse leaves alone. */
function parseFull(text: string, file: string): SourceResult {
  const { LineCounter, parseDocument, isMap, isScalar, isSeq } = yamlLib();
  const lineCounter = new LineCounter();
  let doc: Document.Parsed;
  try {
    doc = parseDocument(text, { lineCounter, uniqueKeys: true, prettyErrors: false, strict: true });
  } catch (e) {
    return { ok: false, diagnostics: [{ code: "yaml/syntax", message: `the file could not be read as YAML or JSON: ${(e as Error).message}`, location: { file } }] };
  }
  const pos = (offset: number | undefined) => {
    if (offset === undefined) return {};
    const p = lineCounter.linePos(offset);
    return { line: p.line, column: p.col };
  };
  if (doc.errors.length === 0 && doc.contents === null) {
    return { ok: false, diagnostics: [{ code: "input/empty", message: "the file holds only comments or blank lines; a plan needs at least sidcarve, plan, blocks, levels and nodes", location: { file, line: 1, column: 1 } }] };
  }
  if (doc.errors.length > 0) {
    // A syntax error sets off more errors after it; only the first is worth reading. Duplicate
    // keys are independent of each other, so each is reported.
    const syntax = doc.errors.filter((err) => err.code !== "DUPLICATE_KEY");
    const shown = syntax.length > 0 ? syntax.slice(0, 1) : doc.errors.slice(0, 20);
    return {
      ok: false,
      diagnostics: shown.map((err) => {
        const location = { file, ...pos(err.pos[0]) };
        if (isStackOverflow(err.message)) return tooDeep(location);
        if (err.code === "MULTIPLE_DOCS") return { code: "yaml/syntax", message: "the file holds more than one YAML document (a second '---' line); a plan is a single document", location };
        if (err.code !== "DUPLICATE_KEY") return { code: "yaml/syntax", message: firstLine(err.message), location };
        const key = /^("(?:[^"\\\n]|\\.)*"|'[^'\n]*'|[^:,{}\[\]\n]*)/.exec(text.slice(err.pos[0], err.pos[0] + 200))?.[1]?.trim().replace(/^["']|["']$/g, "") ?? "";
        return { code: "yaml/duplicate-key", message: `the key ${quote(key)} appears twice in one mapping; keep only one of them`, location };
      }),
    };
  }
  let data: unknown;
  try {
    // maxAliasCount bounds alias expansion ("billion laughs"); the yaml library throws past it.
    data = doc.toJS({ maxAliasCount: 1000 });
  } catch (e) {
    const msg = (e as Error).message || String(e);
    if (isStackOverflow(msg)) return { ok: false, diagnostics: [tooDeep({ file, line: 1, column: 1 })] };
    const bomb = /alias/i.test(msg);
    return {
      ok: false,
      diagnostics: [
        {
          code: bomb ? "yaml/alias-limit" : "yaml/syntax",
          message: bomb ? "the file expands aliases too many times (an alias bomb?); write the values out instead of nesting aliases" : firstLine(msg),
          location: { file, line: 1, column: 1 },
        },
      ],
    };
  }
  const depth = depthOf(data, 0);
  if (depth > MAX_DEPTH) {
    return { ok: false, diagnostics: [{ code: "input/too-deep", message: `the data is nested ${depth > 10000 ? "more than 10000" : depth} levels deep; at most ${MAX_DEPTH} are allowed`, location: { file, line: 1, column: 1 } }] };
  }
  const locate: Locator = (path, options) => {
    let node: unknown = doc.contents;
    let found: YamlNode | undefined = doc.contents ?? undefined;
    for (const [i, key] of path.entries()) {
      if (isMap(node)) {
        const pair = node.items.find((it) => isScalar(it.key) && String(it.key.value) === String(key));
        if (!pair) break;
        node = pair.value;
        // Pointing at a block mapping or list value would name the line after its key.
        const atKey = !isScalar(pair.value) || (options?.key === true && i === path.length - 1);
        found = ((atKey ? pair.key : pair.value) as YamlNode | null) ?? found;
      } else if (isSeq(node) && typeof key === "number") {
        const item = node.items[key];
        if (item === undefined) break;
        node = item;
        found = item as YamlNode;
      } else break;
    }
    return { file, ...pos(found?.range?.[0]), path: [...path] };
  };
  return { ok: true, data, locate };
}

/** The JavaScript engine ran out of stack: the only way YAML nesting shows up before depthOf can count it. */
function isStackOverflow(message: string): boolean {
  return /maximum call stack size exceeded/i.test(message);
}

function tooDeep(location: SourceLocation): Diagnostic {
  return { code: "input/too-deep", message: `the data is nested too deeply to read (hundreds of levels or more); at most ${MAX_DEPTH} are allowed`, location };
}

function firstLine(s: string): string {
  return s.split("\n")[0]!.trim();
}

function depthOf(v: unknown, d: number): number {
  if (d > 10000) return d;
  if (Array.isArray(v)) {
    let m = d + 1;
    for (const x of v) m = Math.max(m, depthOf(x, d + 1));
    return m;
  }
  if (v !== null && typeof v === "object") {
    let m = d + 1;
    for (const x of Object.values(v)) m = Math.max(m, depthOf(x, d + 1));
    return m;
  }
  return d;
}

/** The plan schema's validator, compiled ahead of time (see validator-code.ts). */
const planValidator = generatedValidate as unknown as ValidateFunction;

/** Validate plan data against the plan schema; each error is located and says what is allowed. */
export function validatePlanData(data: unknown, locate: Locator): Diagnostic[] {
  if (planValidator(data)) return [];
  return schemaDiagnostics(planValidator.errors ?? [], data, locate);
}

/** Turn ajv errors into diagnostics, dropping the noise that oneOf produces. */
export function schemaDiagnostics(errors: readonly ErrorObject[], data: unknown, locate: Locator): Diagnostic[] {
  const out: Diagnostic[] = [];
  const seen = new Set<string>();
  // For oneOf failures ajv reports every branch; keep one message per path.
  const oneOfPaths = new Set(errors.filter((e) => e.keyword === "oneOf").map((e) => e.instancePath));
  for (const e of errors) {
    const path = pointerToPath(e.instancePath);
    if (oneOfPaths.has(e.instancePath) && e.keyword !== "oneOf") continue;
    let message: string;
    let at = path;
    const value = valueAt(data, path);
    const where = path.length ? `${path[path.length - 1]}` : "the plan";
    switch (e.keyword) {
      case "required":
        message = `missing key ${quote((e.params as { missingProperty: string }).missingProperty)} in ${path.length ? where : "the plan"}`;
        break;
      case "additionalProperties": {
        const key = (e.params as { additionalProperty: string }).additionalProperty;
        at = [...path, key];
        const allowed = allowedKeys(e.parentSchema);
        message = `unknown key ${quote(key)}${allowed ? `; allowed here: ${allowed}` : ""}`;
        break;
      }
      case "enum":
        message = `${quote(value)} is not allowed for ${where}; allowed: ${((e.params as { allowedValues: unknown[] }).allowedValues ?? []).map((v) => quote(v)).join(", ")}`;
        break;
      case "const":
        message = `${quote(value)} is not allowed for ${where}; it must be ${quote((e.params as { allowedValue: unknown }).allowedValue)}`;
        break;
      case "type":
        message = `${where} is ${describe(value)}; it must be ${(e.params as { type: string }).type}`;
        break;
      case "oneOf":
        message = `${quote(value)} is not valid for ${where}; ${oneOfHint(e.schema)}`;
        break;
      case "minimum":
      case "maximum":
      case "exclusiveMinimum":
      case "exclusiveMaximum":
        // ajv's message reads "must be <= 64"; a YAML number too large for a double reads as Infinity.
        message = `${typeof value === "number" && !Number.isFinite(value) ? "a number too large to hold" : quote(value)} is out of range for ${where}; it ${e.message}`;
        break;
      case "maxLength":
        message = `${quote(value)} is too long for ${where} (${typeof value === "string" ? value.length : "?"} characters); at most ${(e.params as { limit: number }).limit} are allowed`;
        break;
      case "pattern":
        message = `${quote(value)} is not valid for ${where}; ${patternHint(where)}`;
        break;
      case "uniqueItems":
        message = `${where} lists the same item twice (items ${(e.params as { i: number; j: number }).j} and ${(e.params as { i: number }).i})`;
        break;
      default:
        message = `${quote(value)} is not valid for ${where}: ${e.message ?? e.keyword}`;
    }
    const key = `${at.join("/")}|${message}`;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push({ code: `schema/${e.keyword}`, message, location: locate(at, { key: e.keyword === "additionalProperties" }) });
    if (out.length >= 50) break;
  }
  return out;
}

function allowedKeys(schema: unknown): string | undefined {
  const props = (schema as { properties?: Record<string, unknown> } | undefined)?.properties;
  return props ? Object.keys(props).join(", ") : undefined;
}

function oneOfHint(schema: unknown): string {
  const branches = Array.isArray(schema) ? (schema as { type?: string; pattern?: string }[]) : [];
  if (branches.some((b) => b.pattern?.includes("0[xX]"))) return "write a whole number (e.g. 12 or \"0x0c\") or a range \"first-last\"";
  if (branches.some((b) => b.type === "object")) return "write a node name, or an object with node and optional interface/function";
  return "see schemas/plan.schema.json";
}

function patternHint(where: string): string {
  if (where === "expires") return "write a date as YYYY-MM-DD";
  return "names may not contain control characters";
}

function describe(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return "a list";
  if (typeof v === "object") return "a mapping";
  return `${typeof v} ${quote(v)}`;
}

/** JSON Pointer (RFC 6901) to path segments; numeric segments become numbers. */
export function pointerToPath(pointer: string): (string | number)[] {
  if (pointer === "") return [];
  return pointer
    .slice(1)
    .split("/")
    .map((s) => s.replace(/~1/g, "/").replace(/~0/g, "~"))
    .map((s) => (/^(0|[1-9]\d*)$/.test(s) ? Number(s) : s));
}

function valueAt(data: unknown, path: readonly (string | number)[]): unknown {
  let v: unknown = data;
  for (const k of path) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<string | number, unknown>)[k];
  }
  return v;
}
