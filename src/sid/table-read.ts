/**
 * Reading SID tables (our CSV and JSON forms) from an inventory: bad rows become row problems
 * with their row and column, and the rest of the table is still read.
 */
import { Prefix } from "../net/prefix.js";
import { parseAddr, parsePrefixParts } from "../net/text.js";
import type { LocatorEntry, NodeTable, SidEntry, SidStructure, SidTable } from "./table.js";
import { parseContext } from "./table.js";

/** A row (or header) that could not be read in full. Row 0 is the header. */
export interface TableProblem {
  readonly row: number;
  readonly field: string;
  readonly message: string;
  readonly value: string;
}

export interface ReadTableResult {
  readonly table: SidTable;
  readonly problems: readonly TableProblem[];
  /** True when the table could not be read at all (no header, wrong schema); problems say why. */
  readonly unreadable: boolean;
  /** The 1-based line of a data row (CSV; row 0 is the header), when known. */
  readonly lineOf?: (row: number) => number | undefined;
}

/** Columns a CSV table must have. */
export const REQUIRED_COLUMNS = ["node", "sid", "behavior"] as const;
/** Columns it may have. */
export const OPTIONAL_COLUMNS = ["algorithm", "locator", "flavors", "codepoint", "function", "block_bits", "node_bits", "function_bits", "argument_bits", "context"] as const;

const ALL_COLUMNS = new Set<string>([...REQUIRED_COLUMNS, ...OPTIONAL_COLUMNS]);

/** Undo our own formula neutralisation (a leading ' before =, +, -, @, tab, CR). */
function unneutralize(s: string): string {
  return s.length > 1 && s.charCodeAt(0) === 39 && /^'[=+\-@\t\r]/.test(s) ? s.slice(1) : s;
}

/**
 * Split CSV text into records (RFC 4180: quoted fields may hold commas, quotes as "", and line
 * breaks). Calls `onRecord(cells, lineNumber)` for each record; an unterminated quote is reported
 * through `onError`. Lines starting with '#' before the header are comments.
 */
export function splitCsv(text: string, onRecord: (cells: string[], line: number) => void, onError: (line: number, message: string) => void): void {
  const n = text.length;
  let i = 0;
  let line = 1;
  while (i < n) {
    const start = i;
    const recordLine = line;
    // fast path: a line without quotes
    let eol = text.indexOf("\n", i);
    if (eol < 0) eol = n;
    let lineText = text.slice(i, eol);
    if (lineText.endsWith("\r")) lineText = lineText.slice(0, -1);
    if (!lineText.includes('"')) {
      i = eol + 1;
      line++;
      if (lineText === "") continue;
      onRecord(lineText.split(","), recordLine);
      continue;
    }
    // slow path: quoted fields
    const cells: string[] = [];
    let cell = "";
    let inQuotes = false;
    i = start;
    let closed = false;
    for (; i < n; i++) {
      const c = text[i]!;
      if (inQuotes) {
        if (c === '"') {
          if (text[i + 1] === '"') {
            cell += '"';
            i++;
          } else inQuotes = false;
        } else {
          if (c === "\n") line++;
          cell += c;
        }
      } else if (c === '"') {
        if (cell !== "") {
          onError(recordLine, `a quote inside an unquoted field (column ${cells.length + 1}); quote the whole field and double inner quotes`);
          while (i < n && text[i] !== "\n") i++;
          line++;
          i++;
          closed = true;
          break;
        }
        inQuotes = true;
      } else if (c === ",") {
        cells.push(cell);
        cell = "";
      } else if (c === "\n" || c === "\r") {
        if (c === "\r" && text[i + 1] === "\n") i++;
        i++;
        line++;
        closed = true;
        cells.push(cell);
        onRecord(cells, recordLine);
        break;
      } else cell += c;
    }
    if (!closed) {
      if (inQuotes) {
        onError(recordLine, "a quoted field is not closed before the end of the file");
        return;
      }
      cells.push(cell);
      onRecord(cells, recordLine);
    }
  }
}

interface Builder {
  nodes: Map<string, { locators: Map<string, LocatorEntry>; sids: SidEntry[] }>;
}

function addSid(b: Builder, node: string, s: SidEntry): void {
  let n = b.nodes.get(node);
  if (!n) {
    n = { locators: new Map(), sids: [] };
    b.nodes.set(node, n);
  }
  if (s.locator) {
    const k = `${s.algorithm}|${s.locator.format()}`;
    if (!n.locators.has(k)) n.locators.set(k, { prefix: s.locator, algorithm: s.algorithm, block: "", anycast: "" });
  }
  n.sids.push(s);
}

function finish(plan: string, b: Builder): SidTable {
  const nodes: NodeTable[] = [...b.nodes.entries()]
    .sort(([a], [c]) => (a < c ? -1 : a > c ? 1 : 0))
    .map(([node, v]) => ({ node, locators: [...v.locators.values()], sids: v.sids }));
  return { plan, nodes };
}

/** Read a CSV SID table. The header names the columns (any order); required: node, sid, behavior. */
export function readCsvTable(text: string, plan = ""): ReadTableResult {
  const problems: TableProblem[] = [];
  const b: Builder = { nodes: new Map() };
  let header: string[] | undefined;
  let col: Record<string, number> = {};
  let row = 0;
  const lines: number[] = [];
  const prefixCache = new Map<string, Prefix | string>();
  const getPrefix = (s: string): Prefix | string => {
    let p = prefixCache.get(s);
    if (p === undefined) {
      const r = parsePrefixParts(s);
      p = r.ok ? new Prefix(r.value.addr, r.value.len) : r.reason;
      prefixCache.set(s, p);
    }
    return p;
  };
  let fatal = false;
  splitCsv(
    text,
    (cells, line) => {
      if (fatal) return;
      if (!header) {
        if (cells[0]?.startsWith("#")) return;
        header = cells.map((c) => c.trim());
        lines[0] = line;
        const missing = REQUIRED_COLUMNS.filter((c) => !header!.includes(c));
        if (missing.length) {
          problems.push({ row: 0, field: missing.join(","), message: `the header lacks the required column${missing.length > 1 ? "s" : ""} ${missing.join(", ")}; required: ${REQUIRED_COLUMNS.join(", ")}`, value: header.join(",") });
          fatal = true;
          return;
        }
        header.forEach((h, i) => {
          if (!ALL_COLUMNS.has(h)) problems.push({ row: 0, field: h, message: `unknown column ${JSON.stringify(h)}; allowed: ${[...ALL_COLUMNS].join(", ")}`, value: h });
          else if (col[h] !== undefined) problems.push({ row: 0, field: h, message: `column ${JSON.stringify(h)} appears twice`, value: h });
          else col[h] = i;
        });
        return;
      }
      row++;
      lines[row] = line;
      if (cells.length !== header.length) {
        problems.push({ row, field: "", message: `row has ${cells.length} cells but the header has ${header.length} columns (line ${line})`, value: cells.join(",").slice(0, 80) });
        return;
      }
      const get = (name: string): string | undefined => {
        const i = col[name];
        return i === undefined ? undefined : unneutralize(cells[i]!.trim());
      };
      const bad = (field: string, value: string, message: string) => problems.push({ row, field, message, value });
      const node = get("node")!;
      if (node === "") return bad("node", node, "node name is empty");
      const sidText = get("sid")!;
      const a = parseAddr(sidText);
      if (!a.ok) return bad("sid", sidText, a.reason);
      const behavior = get("behavior")!;
      if (behavior === "") return bad("behavior", behavior, "behavior is empty; write the IANA name, e.g. End.DT4");
      let algorithm = 0;
      const algText = get("algorithm");
      if (algText !== undefined && algText !== "") {
        if (!/^\d{1,3}$/.test(algText) || Number(algText) > 255) return bad("algorithm", algText, `algorithm ${JSON.stringify(algText)} is not a whole number 0..255`);
        algorithm = Number(algText);
      }
      let locator: Prefix | undefined;
      const locText = get("locator");
      if (locText !== undefined && locText !== "") {
        const p = getPrefix(locText);
        if (typeof p === "string") return bad("locator", locText, p);
        locator = p;
      }
      let codepoint: number | undefined;
      const cpText = get("codepoint");
      if (cpText !== undefined && cpText !== "") {
        if (!/^\d{1,5}$/.test(cpText) || Number(cpText) > 65535) return bad("codepoint", cpText, `codepoint ${JSON.stringify(cpText)} is not a whole number 0..65535`);
        codepoint = Number(cpText);
      }
      let fn = 0n;
      const fnText = get("function");
      if (fnText !== undefined && fnText !== "") {
        if (!/^(0[xX][0-9a-fA-F]{1,32}|\d{1,39})$/.test(fnText)) return bad("function", fnText, `function ${JSON.stringify(fnText)} is not a number (write hex as 0x100)`);
        fn = BigInt(fnText);
      }
      let structure: SidStructure | undefined;
      const sb = ["block_bits", "node_bits", "function_bits", "argument_bits"].map((k) => get(k));
      if (sb.some((x) => x !== undefined && x !== "")) {
        const nums: number[] = [];
        for (let k = 0; k < 4; k++) {
          const t = sb[k] ?? "";
          const name = ["block_bits", "node_bits", "function_bits", "argument_bits"][k]!;
          if (!/^\d{1,3}$/.test(t) || Number(t) > 128) return bad(name, t, `${name} ${JSON.stringify(t)} is not a whole number 0..128`);
          nums.push(Number(t));
        }
        structure = { block: nums[0]!, node: nums[1]!, function: nums[2]!, argument: nums[3]! };
      }
      const ctxText = get("context") ?? "";
      const context = parseContext(ctxText);
      if (!context) return bad("context", ctxText, "context must be key=value pairs joined with ';'");
      const flavors = (get("flavors") ?? "").split("+").map((f) => f.trim()).filter((f) => f !== "");
      addSid(b, node, { sid: a.value, behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key: sidKeyFromContext(behavior, flavors, algorithm, context), row });
    },
    (line, message) => {
      // a broken record still counts as a row, so later rows keep their numbers
      if (header) {
        row++;
        lines[row] = line;
      }
      problems.push({ row: header ? row : 0, field: "", message: `${message} (line ${line})`, value: "" });
    },
  );
  if (!header && !fatal) {
    problems.push({ row: 0, field: "", message: `the table has no header line; the first line must name the columns (required: ${REQUIRED_COLUMNS.join(", ")})`, value: "" });
    fatal = true;
  }
  return { table: finish(plan, b), problems, unreadable: fatal, lineOf: (r) => lines[r] };
}

/** A binding identity for rows that come from a table: behaviour and its context (used by diff). */
export function sidKeyFromContext(behavior: string, flavors: readonly string[], algorithm: number, context: Readonly<Record<string, string>>): string {
  const ctx = Object.keys(context)
    .filter((k) => k !== "link")
    .sort()
    .map((k) => `${k}=${context[k]}`)
    .join(";");
  return `${algorithm}|${behavior}|${behavior === "End" ? flavors.filter((f) => f !== "NEXT-CSID" && f !== "REPLACE-CSID").join("+") : ""}|${ctx}`;
}

/** Text of any JSON value, without ever throwing (String() throws on {"toString": 1}, JSON.stringify on deep nesting). */
function textOf(v: unknown): string {
  if (typeof v === "string") return v;
  try {
    return JSON.stringify(v) ?? "";
  } catch {
    return "(a value nested too deeply to show)";
  }
}

/** `obj[key]` when it is a list; absent is an empty list, anything else a problem and an empty list. */
function listAt(obj: any, key: string, at: string, row: number, problems: TableProblem[]): any[] {
  const v = obj?.[key];
  if (Array.isArray(v)) return v;
  if (v !== undefined && v !== null) problems.push({ row, field: `${at}.${key}`, message: `${key} must be a list`, value: textOf(v).slice(0, 80) });
  return [];
}

/** Read a JSON SID table (sidcarve/sid-table/v1). Bad entries are problems numbered by their place in the file. */
export function readJsonTable(text: string): ReadTableResult {
  const problems: TableProblem[] = [];
  let data: any;
  try {
    data = JSON.parse(text);
  } catch (e) {
    return { table: { plan: "", nodes: [] }, problems: [{ row: 0, field: "", message: `not valid JSON: ${(e as Error).message}`, value: "" }], unreadable: true };
  }
  if (data === null || typeof data !== "object" || data.schema !== "sidcarve/sid-table/v1" || !Array.isArray(data.nodes)) {
    return { table: { plan: "", nodes: [] }, problems: [{ row: 0, field: "schema", message: 'not a sidcarve SID table: expected "schema": "sidcarve/sid-table/v1" and a "nodes" list', value: textOf(data?.schema ?? "") }], unreadable: true };
  }
  const b: Builder = { nodes: new Map() };
  let row = 0;
  for (const [ni, n] of (data.nodes as any[]).entries()) {
    const node = typeof n?.node === "string" ? n.node : "";
    if (node === "") {
      problems.push({ row: row + 1, field: `nodes[${ni}].node`, message: "node name is missing or empty", value: "" });
      continue;
    }
    const entry: { locators: Map<string, LocatorEntry>; sids: SidEntry[] } = b.nodes.get(node) ?? { locators: new Map(), sids: [] };
    b.nodes.set(node, entry);
    for (const [li, l] of listAt(n, "locators", `nodes[${ni}]`, row + 1, problems).entries()) {
      const r = typeof l?.prefix === "string" ? parsePrefixParts(l.prefix) : { ok: false as const, reason: "locator prefix is missing" };
      if (!r.ok) {
        problems.push({ row: row + 1, field: `nodes[${ni}].locators[${li}].prefix`, message: r.reason, value: textOf(l?.prefix ?? "") });
        continue;
      }
      const algorithm = Number.isInteger(l.algorithm) ? l.algorithm : 0;
      const prefix = new Prefix(r.value.addr, r.value.len);
      entry.locators.set(`${algorithm}|${prefix.format()}`, { prefix, algorithm, block: typeof l.block === "string" ? l.block : "", anycast: typeof l.anycast === "string" ? l.anycast : "" });
    }
    for (const [si, s] of listAt(n, "sids", `nodes[${ni}]`, row + 1, problems).entries()) {
      row++;
      const at = `nodes[${ni}].sids[${si}]`;
      const bad = (field: string, message: string, value: unknown) => problems.push({ row, field: `${at}.${field}`, message, value: textOf(value ?? "") });
      const a = typeof s?.sid === "string" ? parseAddr(s.sid) : { ok: false as const, reason: "sid is missing" };
      if (!a.ok) {
        bad("sid", a.reason, s?.sid);
        continue;
      }
      if (typeof s.behavior !== "string" || s.behavior === "") {
        bad("behavior", "behavior is missing; write the IANA name, e.g. End.DT4", s.behavior);
        continue;
      }
      let locator: Prefix | undefined;
      if (typeof s.locator === "string") {
        const r = parsePrefixParts(s.locator);
        if (!r.ok) {
          bad("locator", r.reason, s.locator);
          continue;
        }
        locator = new Prefix(r.value.addr, r.value.len);
      }
      let fn = 0n;
      if (typeof s.function === "string" && /^(0[xX][0-9a-fA-F]{1,32}|\d{1,39})$/.test(s.function)) fn = BigInt(s.function);
      else if (s.function !== undefined && s.function !== null) {
        bad("function", `function ${JSON.stringify(s.function)} is not a number (write hex as "0x100")`, s.function);
        continue;
      }
      const st = s.structure;
      const structure = st && [st.block, st.node, st.function, st.argument].every((x: unknown) => Number.isInteger(x) && (x as number) >= 0 && (x as number) <= 128) ? { block: st.block, node: st.node, function: st.function, argument: st.argument } : undefined;
      if (st && !structure) {
        bad("structure", "structure needs whole numbers 0..128 for block, node, function and argument", textOf(st));
        continue;
      }
      const flavors = Array.isArray(s.flavors) ? s.flavors.map(textOf) : [];
      const algorithm = Number.isInteger(s.algorithm) ? s.algorithm : 0;
      const context: Record<string, string> = Object.create(null); // keys such as "__proto__" stay data
      if (s.context && typeof s.context === "object") for (const [k, v] of Object.entries(s.context)) context[k] = textOf(v);
      // the same range the CSV reader accepts: IANA "SRv6 Endpoint Behaviors" codepoints are 16 bits
      if (s.codepoint !== undefined && s.codepoint !== null && !(Number.isInteger(s.codepoint) && s.codepoint >= 0 && s.codepoint <= 65535)) {
        bad("codepoint", `codepoint ${textOf(s.codepoint)} is not a whole number 0..65535`, s.codepoint);
        continue;
      }
      const codepoint = Number.isInteger(s.codepoint) ? s.codepoint : undefined;
      const sid: SidEntry = { sid: a.value, behavior: s.behavior, flavors, codepoint, algorithm, locator, function: fn, structure, context, key: sidKeyFromContext(s.behavior, flavors, algorithm, context), row };
      entry.sids.push(sid);
    }
  }
  return { table: finish(typeof data.plan === "string" ? data.plan : "", b), problems, unreadable: false };
}
