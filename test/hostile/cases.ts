/**
 * The hostile-input corpus as data: every entry names its input (a file in corpus/, or bytes made
 * here for the big and binary ones), the command to run on it, and what must come out; `judge`
 * says whether a run met that. Shared by test/hostile/hostile.test.ts and by
 * scripts/reliability.mjs, which transpiles this file and rewrites docs/reliability.md from it.
 * Node built-ins only, so that the script can load it without the test tooling.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";

export const CORPUS = new URL("./corpus/", import.meta.url).pathname;

/** What a run must give. */
export type Expect =
  /** exit 2 and exactly one located diagnostic with this code (for plans) */
  | { readonly exit: 2; readonly code: string; readonly line?: number | readonly [number, number] }
  /** exit 2 with a plain message that names the input (a folder, an unreadable table) */
  | { readonly exit: 2; readonly message: RegExp }
  /** lint findings: exit 1 and findings of this rule, each located (on these lines when given) */
  | { readonly exit: 1; readonly rule: string; readonly lines?: readonly number[] }
  /** a valid input: exit 0 */
  | { readonly exit: 0 };

export interface Case {
  readonly id: string;
  /** What the entry is about, for the record. */
  readonly about: string;
  /** File name of the input inside the case's folder. */
  readonly file: string;
  /** The input's bytes; "dir" makes a folder of that name. */
  readonly input: () => Uint8Array | "dir";
  readonly command: "allocate" | "lint" | "diff";
  /** Arguments after the command (default: the input file). */
  readonly args?: readonly string[];
  /** Other files the run needs beside the input (name -> bytes). */
  readonly companions?: () => Readonly<Record<string, Uint8Array>>;
  readonly expect: Expect;
  /** A defect found and reported but not fixed yet: the test expects this case to fail. */
  readonly knownDefect?: string;
}

const utf8 = (s: string) => new TextEncoder().encode(s);
const corpusText = (name: string) => readFileSync(join(CORPUS, name), "utf8");
const corpusBytes = (name: string) => new Uint8Array(readFileSync(join(CORPUS, name)));

/** 1-based line of the `n`-th occurrence of `needle` (throws when absent, so a broken corpus fails loudly). */
export function lineOf(text: string, needle: string, n = 0): number {
  let at = -1;
  for (let i = 0; i <= n; i++) {
    at = text.indexOf(needle, at + 1);
    if (at < 0) throw new Error(`corpus text has no ${JSON.stringify(needle)} #${n}`);
  }
  return text.slice(0, at).split("\n").length;
}

/** A deterministic byte stream (xorshift32), for "binary garbage" that is the same on every run. */
export function garbage(length: number, seed = 0x5eed1234): Uint8Array {
  const out = new Uint8Array(length);
  let x = seed >>> 0;
  for (let i = 0; i < length; i++) {
    x ^= x << 13;
    x >>>= 0;
    x ^= x >>> 17;
    x ^= x << 5;
    x >>>= 0;
    out[i] = x & 0xff;
  }
  return out;
}

const BASE = "valid-base.yaml";
const MB10 = 10 * 1024 * 1024;

/** A committed plan that must be refused with one diagnostic `code` on the line of `needle`. */
function planCase(id: string, about: string, code: string, needle?: string | number): Case {
  const file = `${id}.yaml`.replace(/\.yaml$/, id.endsWith(".json") ? "" : ".yaml");
  const text = corpusText(file);
  const line = typeof needle === "number" ? needle : needle === undefined ? undefined : lineOf(text, needle);
  return { id, about, file, input: () => corpusBytes(file), command: "allocate", expect: { exit: 2, code, ...(line !== undefined ? { line } : {}) } };
}

function withBom(b: Uint8Array): Uint8Array {
  return new Uint8Array([0xef, 0xbb, 0xbf, ...b]);
}
const crlf = (s: string) => s.replace(/\n/g, "\r\n");

export function cases(): Case[] {
  const base = corpusText(BASE);
  const pe1Line = lineOf(base, "weir-pe1");
  const unclosed = lineOf(corpusText("syntax-unclosed-flow.yaml"), "{ name: weir-p1, place: weir\n");
  const plans: Case[] = [
    { ...planCase("syntax-unclosed-flow", "YAML syntax error: a flow mapping that is never closed", "yaml/syntax"), expect: { exit: 2, code: "yaml/syntax", line: [unclosed, unclosed + 1] } },
    planCase("syntax-tab-indent", "YAML syntax error: a tab used as indentation", "yaml/syntax", "\t"),
    planCase("syntax-nested-colon", "YAML syntax error: a second ': ' inside a plain value", "yaml/syntax", "plan: quillmere: main"),
    planCase("syntax-json.json", "JSON syntax error: a list closed by '}'", "yaml/syntax", 1),
    planCase("multi-doc", "two YAML documents in one file", "yaml/syntax", "---"),
    planCase("alias-bomb", "alias bomb: nine levels of nine-fold aliases (9^9 expansions)", "yaml/alias-limit"),
    planCase("duplicate-key", "a key given twice", "yaml/duplicate-key", "plan: quillmere-again"),
    planCase("empty", "an empty file", "input/empty", 1),
    planCase("blank", "only blank lines and a comment", "input/empty", 1),
    planCase("top-list", "a list instead of a mapping", "schema/type", 1),
    planCase("negative-bits", "a negative bit length", "schema/minimum", "-8"),
    planCase("fractional-bits", "a fractional bit length", "schema/type", "4.5"),
    planCase("fractional-argument", "a fractional argument length", "schema/type", "0.5"),
    planCase("bits-as-string", "a bit length written as a string", "schema/type", '"8"'),
    planCase("negative-pin", "a negative pinned value", "schema/oneOf", "value: -1"),
    planCase("huge-number-float", "a number beyond a double (1e400)", "schema/maximum", "1e400"),
    planCase("huge-number-int", "a 39-digit bit length", "schema/maximum", "123456789012345678901234567890"),
    planCase("ipv4-prefix", "an IPv4 prefix where a block's IPv6 prefix is due", "plan/prefix", "192.0.2.0/24"),
    planCase("ipv4-infrastructure", "an IPv4 prefix in the infrastructure list", "plan/prefix", "192.0.2.0/24"),
    planCase("ipv4-mapped", "an IPv4-mapped dotted-quad block prefix (/120): refused, SIDs cannot live in ::ffff:0:0/96", "plan/block-space", "prefix:"),
    planCase("zone-id", "a zone id in a block prefix", "plan/prefix", "%eth0"),
    planCase("zone-id-infrastructure", "a zone id in an infrastructure prefix", "plan/prefix", "%ring0"),
    planCase("control-char-name", "a node name holding a tab", "schema/pattern", "weir\\tpe1"),
    {
      id: "deep-flow-seq",
      about: "100,000 nested flow lists",
      file: "deep-flow-seq.yaml",
      input: () => utf8("sidcarve: 1\nplan: " + "[".repeat(100_000) + "]".repeat(100_000) + "\n"),
      command: "allocate",
      expect: { exit: 2, code: "input/too-deep", line: 2 },
    },
    {
      id: "deep-json-objects",
      about: "100,000 nested JSON objects",
      file: "deep-json-objects.json",
      input: () => utf8('{"a":'.repeat(100_000) + "1" + "}".repeat(100_000)),
      command: "allocate",
      expect: { exit: 2, code: "input/too-deep", line: 1 },
    },
    {
      id: "deep-block-maps",
      about: "2,000 nested block mappings (two million characters of indentation)",
      file: "deep-block-maps.yaml",
      input: () => utf8(Array.from({ length: 2000 }, (_, i) => " ".repeat(i) + `k${i}:`).join("\n") + " 1\n"),
      command: "allocate",
      expect: { exit: 2, code: "input/too-deep" },
    },
    {
      id: "huge-string",
      about: "a 10 MB plan name",
      file: "huge-string.yaml",
      input: () => utf8(base.replace("plan: quillmere", "plan: " + "q".repeat(MB10))),
      command: "allocate",
      expect: { exit: 2, code: "schema/maxLength", line: lineOf(base, "plan: quillmere") },
    },
    {
      id: "huge-digits",
      about: "a bit length of ten million digits",
      file: "huge-digits.yaml",
      input: () => utf8(base.replace("bits: 8", "bits: " + "9".repeat(MB10))),
      command: "allocate",
      expect: { exit: 2, code: "schema/maximum", line: lineOf(base, "bits: 8") },
    },
    {
      id: "non-utf8",
      about: "a 0xff byte inside a node name",
      file: "non-utf8.yaml",
      input: () => {
        const b = utf8(base);
        const at = new TextEncoder().encode(base.slice(0, base.indexOf("weir-pe1") + 4)).length;
        return new Uint8Array([...b.subarray(0, at), 0xff, ...b.subarray(at)]);
      },
      command: "allocate",
      expect: { exit: 2, code: "input/encoding", line: pe1Line },
    },
    {
      id: "late-bad-byte",
      about: "10 MB of valid comment lines, then one 0xff byte",
      file: "late-bad-byte.yaml",
      input: () => new Uint8Array(Buffer.concat([utf8(base), utf8(("#" + "a".repeat(99) + "\n").repeat(100_000)), new Uint8Array([0x23, 0xff, 0x0a])])),
      command: "allocate",
      expect: { exit: 2, code: "input/encoding", line: base.split("\n").length + 100_000 },
    },
    {
      id: "latin1",
      about: "a Latin-1 'é' (0xe9) in a comment",
      file: "latin1.yaml",
      input: () => {
        const b = utf8(base.replace("invented operator", "invented op\u0001rator"));
        return b.map((x) => (x === 1 ? 0xe9 : x));
      },
      command: "allocate",
      expect: { exit: 2, code: "input/encoding", line: lineOf(base, "invented operator") },
    },
    {
      id: "utf16",
      about: "the plan saved as UTF-16 with a byte-order mark",
      file: "utf16.yaml",
      input: () => new Uint8Array([0xff, 0xfe, ...new Uint8Array(Buffer.from(base, "utf16le"))]),
      command: "allocate",
      expect: { exit: 2, code: "input/encoding", line: 1 },
    },
    {
      id: "nul-byte",
      about: "a NUL byte in a node name",
      file: "nul-byte.yaml",
      input: () => utf8(base.replace("weir-pe1", "weir\u0000pe1")),
      command: "allocate",
      expect: { exit: 2, code: "input/binary", line: pe1Line },
    },
    {
      id: "binary-garbage",
      about: "64 KiB of pseudo-random bytes",
      file: "binary-garbage.yaml",
      input: () => garbage(64 * 1024),
      command: "allocate",
      expect: { exit: 2, code: "input/encoding", line: 1 },
    },
    {
      id: "directory",
      about: "a folder where the plan file should be",
      file: "folder.yaml",
      input: () => "dir",
      command: "allocate",
      expect: { exit: 2, message: /folder\.yaml: is a folder/ },
    },
    {
      id: "bom-crlf-error",
      about: "a byte-order mark and CRLF line ends around a negative bit length: same line as without them",
      file: "bom-crlf-error.yaml",
      input: () => withBom(utf8(crlf(corpusText("negative-bits.yaml")))),
      command: "allocate",
      expect: { exit: 2, code: "schema/minimum", line: lineOf(corpusText("negative-bits.yaml"), "-8") },
    },
    { id: "valid-base", about: "the valid plan the corpus breaks (control)", file: "valid-base.yaml", input: () => corpusBytes(BASE), command: "allocate", expect: { exit: 0 } },
    { id: "bom", about: "the valid plan with a UTF-8 byte-order mark", file: "bom.yaml", input: () => withBom(utf8(base)), command: "allocate", expect: { exit: 0 } },
    { id: "crlf", about: "the valid plan with CRLF line ends", file: "crlf.yaml", input: () => utf8(crlf(base)), command: "allocate", expect: { exit: 0 } },
    { id: "bom-crlf", about: "the valid plan with both", file: "bom-crlf.yaml", input: () => withBom(utf8(crlf(base))), command: "allocate", expect: { exit: 0 } },
    {
      id: "ipv4-mapped-block",
      about: "a block inside ::ffff:0:0/96 (IPv4-mapped): the loader refuses it (IANA special-purpose registry)",
      file: "ipv4-mapped-block.yaml",
      input: () => corpusBytes("ipv4-mapped-block.yaml"),
      command: "lint",
      expect: { exit: 2, code: "plan/block-space", line: lineOf(corpusText("ipv4-mapped-block.yaml"), "::ffff:0.0.0.0/96") },
    },
    {
      id: "function-scan",
      about: "a 40-bit function field reserved all but its last value: allocate must answer in bounded time",
      file: "function-scan.yaml",
      input: () => corpusBytes("function-scan.yaml"),
      command: "allocate",
      expect: { exit: 2, code: "alloc/pool-full" },
    },
  ];
  const table = (id: string, about: string, expect: Expect): Case => ({ id, about, file: id, input: () => corpusBytes(id), command: "lint", expect });
  const csvBase = (bom: boolean) => {
    const rows = [
      "# sidcarve SID table, plan quillmere.",
      "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context",
      "weir-p1,0,5f00:0:2200:101::/64,5f00:0:2200:101:1::,End,,1,0x1,48,16,16,0,",
      "weir-p1,0,5f00:0:2200:101::/64,5f00:0:2200:101:2::,End,PSP+USD,29,0x2,48,16,16,0,",
    ];
    const b = utf8(rows.join("\r\n") + "\r\n");
    return bom ? withBom(b) : b;
  };
  const tables: Case[] = [
    table("csv-missing-column.csv", "CSV whose header lacks the sid column", { exit: 2, message: /csv-missing-column\.csv: not a SID table: .*sid/ }),
    table("csv-extra-cells.csv", "CSV row with one cell too many", { exit: 1, rule: "table-row", lines: [3] }),
    table("csv-missing-cells.csv", "CSV row with cells missing", { exit: 1, rule: "table-row", lines: [2] }),
    // the readers locate these two by row, and name the line in the message only
    table("csv-unterminated-quote.csv", "CSV quoted field never closed", { exit: 1, rule: "table-row" }),
    table("csv-quote-in-field.csv", "CSV quote inside an unquoted field", { exit: 1, rule: "table-row" }),
    table("csv-bad-values.csv", "CSV with an IPv4 SID, a zone id, a negative algorithm and a fractional length (and an IPv4-mapped SID)", { exit: 1, rule: "table-row", lines: [3, 4, 5] }),
    table("json-table-bad-types.json", "JSON table with numbers, nulls and objects where strings and lists are due", { exit: 1, rule: "table-row" }),
    table("json-table-truncated.json", "JSON table cut off in the middle", { exit: 2, message: /json-table-truncated\.json: not a SID table: not valid JSON/ }),
    table("json-table-other-schema.json", "JSON table of an unknown schema version", { exit: 2, message: /json-table-other-schema\.json: not a SID table/ }),
    { id: "csv-empty", about: "an empty CSV file", file: "csv-empty.csv", input: () => new Uint8Array(), command: "lint", expect: { exit: 2, message: /csv-empty\.csv: not a SID table: the table has no header/ } },
    { id: "csv-garbage", about: "64 KiB of pseudo-random bytes as CSV", file: "csv-garbage.csv", input: () => garbage(64 * 1024, 0xc5f), command: "lint", expect: { exit: 2, message: /csv-garbage\.csv/ } },
    {
      id: "csv-huge-cell",
      about: "a 10 MB quoted CSV cell",
      file: "csv-huge-cell.csv",
      input: () => utf8('node,sid,behavior\nweir-p1,"' + "f".repeat(MB10) + '",End\n'),
      command: "lint",
      expect: { exit: 1, rule: "table-row", lines: [2] },
    },
    {
      id: "csv-bom-crlf",
      about: "a valid CSV table with a byte-order mark and CRLF line ends: no difference from the same rows without the mark",
      file: "csv-bom-crlf.csv",
      input: () => csvBase(true),
      command: "diff",
      args: ["plain.csv", "csv-bom-crlf.csv"],
      companions: () => ({ "plain.csv": csvBase(false) }),
      expect: { exit: 0 },
    },
    {
      id: "json-table-deep",
      about: "a JSON table whose context nests 100,000 objects",
      file: "json-table-deep.json",
      input: () => utf8('{"schema":"sidcarve/sid-table/v1","nodes":[{"node":"weir-p1","sids":[{"sid":"5f00:0:2200:101:1::","behavior":"End","context":{"vrf":' + '{"a":'.repeat(100_000) + "1" + "}".repeat(100_000) + "}}]}]}"),
      command: "lint",
      expect: { exit: 1, rule: "sid-outside-locator" },
    },
  ];
  return [...plans, ...tables];
}

/** What one run of the CLI gave, and which files in its folder it added, removed or changed. */
export interface Outcome {
  readonly code: number | null;
  readonly timedOut: boolean;
  readonly stdout: string;
  readonly stderr: string;
  readonly changedFiles: readonly string[];
}

/** A diagnostic line as the CLI prints it: `location: message [area/code]`. */
const DIAGNOSTIC = /^(.*): .* \[([a-z0-9-]+\/[A-Za-z0-9-]+)\]$/;

/** Diagnostic lines of stderr. */
export function diagnosticLines(stderr: string): string[] {
  return stderr.split("\n").filter((l) => DIAGNOSTIC.test(l));
}

/** Why a run did not meet its case's expectation; empty when it did. */
export function judge(c: Case, o: Outcome): string[] {
  const bad: string[] = [];
  const e = c.expect;
  if (o.timedOut) return ["did not finish within the time limit"];
  if (o.code !== e.exit) bad.push(`exit ${o.code}, expected ${e.exit}`);
  if (/^\s{4}at /m.test(o.stderr) || /^\s{4}at /m.test(o.stdout)) bad.push("printed a stack trace");
  if (/internal error|FATAL ERROR|heap out of memory/i.test(o.stderr)) bad.push("crashed");
  if (e.exit !== 0 && o.changedFiles.length > 0) bad.push(`left files behind: ${o.changedFiles.join(", ")}`);
  if (e.exit === 2 && "code" in e) {
    const diags = diagnosticLines(o.stderr);
    if (diags.length !== 1) bad.push(`${diags.length} diagnostics, expected exactly one`);
    const d = diags[0];
    if (d) {
      const [, where, code] = DIAGNOSTIC.exec(d)!;
      if (code !== e.code) bad.push(`code ${code}, expected ${e.code}`);
      const m = new RegExp(`^${c.file.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}:(\\d+)`).exec(where!);
      if (!m) bad.push(`no file:line location in ${JSON.stringify(where)}`);
      else if (e.line !== undefined) {
        const line = Number(m[1]);
        const [lo, hi] = typeof e.line === "number" ? [e.line, e.line] : e.line;
        if (line < lo || line > hi) bad.push(`line ${line}, expected ${lo === hi ? lo : `${lo}-${hi}`}`);
      }
    }
  }
  if (e.exit === 2 && "message" in e && !e.message.test(o.stderr)) bad.push(`stderr does not match ${e.message}`);
  if (e.exit === 1) {
    const hits = o.stdout.split("\n").filter((l) => l.includes(`[${e.rule}]`));
    if (hits.length === 0) bad.push(`no ${e.rule} finding`);
    for (const h of hits) if (!h.trim().startsWith(c.file)) bad.push(`finding without a location: ${h.trim().slice(0, 80)}`);
    for (const n of e.lines ?? []) if (!hits.some((h) => h.trim().startsWith(`${c.file}:${n} `) || h.trim().startsWith(`${c.file}:${n}:`))) bad.push(`no ${e.rule} finding on line ${n}`);
  }
  if (e.exit === 0 && o.stderr.trim() !== "") bad.push(`unexpected stderr: ${o.stderr.trim().slice(0, 120)}`);
  return bad;
}

/** The first line a person would read: the single diagnostic, else the first stderr line, else the first finding. */
export function firstMessage(o: Outcome): string {
  const d = diagnosticLines(o.stderr)[0] ?? o.stderr.split("\n").find((l) => l.trim() !== "") ?? o.stdout.split("\n").find((l) => /\[[a-z0-9-]+\]$/.test(l.trim())) ?? "";
  return d.trim();
}

/** Property-based runs over the sample plans (test/hostile/mutations.test.ts): the seed of the first. */
export const MUTATION_SEED = 0x51dca7;

/**
 * Runs per sample plan: byte-level and token-level. Large plans are slow to load, so they get
 * fewer runs and the whole property file stays near twenty seconds.
 */
export function mutationRuns(size: number): { readonly bytes: number; readonly tokens: number } {
  return size > 16 * 1024 ? { bytes: 40, tokens: 40 } : { bytes: 1200, tokens: 1200 };
}
