/**
 * The fast plan reader (src/plan/fast-yaml.ts) against the yaml library it stands in for: on every
 * committed plan and fixture, on a generated benchmark plan, and on random YAML built from a
 * grammar full of tricky scalars, indentation and comments. fastParse must either give up
 * (undefined) or give exactly the library's value, and only for text the library reads without
 * an error or a warning. Diagnostics through loadPlanText must not depend on which path ran.
 */
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parseDocument } from "yaml";
import { fastParse, resolvePlain } from "../../src/plan/fast-yaml.js";
import { loadPlanText } from "../../src/plan/load.js";
import { MAX_DEPTH, parseSource } from "../../src/plan/source.js";

const ROOT = new URL("../../", import.meta.url).pathname;
const SAMPLES = join(ROOT, "sample-plans");
const CORPUS = join(ROOT, "test/hostile/corpus");

/** What the library gives for the text: its errors and warnings, and the value (or that toJS threw). */
function reference(text: string): { errors: number; warnings: number; threw: boolean; value: unknown } {
  const doc = parseDocument(text, { uniqueKeys: true, strict: true });
  let value: unknown;
  let threw = false;
  try {
    value = doc.toJS({ maxAliasCount: 1000 });
  } catch {
    threw = true;
  }
  return { errors: doc.errors.length, warnings: doc.warnings.length, threw, value };
}

/** Deep equality with key order, NaN and -0 (Object.is on numbers), and the same prototypes. */
function same(a: unknown, b: unknown): boolean {
  if (typeof a !== typeof b) return false;
  if (a === null || b === null || typeof a !== "object") return Object.is(a, b);
  if (Object.getPrototypeOf(a) !== Object.getPrototypeOf(b)) return false;
  if (Array.isArray(a)) {
    const bb = b as unknown[];
    return a.length === bb.length && a.every((x, i) => same(x, bb[i]));
  }
  const ka = Object.keys(a);
  const kb = Object.keys(b as object);
  if (ka.length !== kb.length || ka.some((k, i) => k !== kb[i])) return false;
  return ka.every((k) => same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
}

/** The property: no value, or the library's value for text the library reads cleanly. Returns whether the fast path took it. */
function agrees(text: string): boolean {
  const fast = fastParse(text);
  if (fast === undefined) return false;
  const ref = reference(text);
  expect({ errors: ref.errors, warnings: ref.warnings, threw: ref.threw }, JSON.stringify(text)).toEqual({ errors: 0, warnings: 0, threw: false });
  expect(same(fast, ref.value), `${JSON.stringify(text)}\nfast: ${JSON.stringify(fast)}\nyaml: ${JSON.stringify(ref.value)}`).toBe(true);
  return true;
}

const filesIn = (dir: string, re: RegExp) =>
  readdirSync(dir)
    .filter((f) => re.test(f))
    .sort()
    .map((f) => join(dir, f));

describe("fastParse on committed plans and fixtures", () => {
  it("reads every sample plan on the fast path, with the library's value", () => {
    const files = filesIn(SAMPLES, /\.(ya?ml|json)$/);
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) expect(agrees(readFileSync(f, "utf8")), f).toBe(true);
  });

  it("gives the library's value or nothing on every YAML and JSON file of the hostile corpus", () => {
    const files = filesIn(CORPUS, /\.(ya?ml|json)$/);
    expect(files.length).toBeGreaterThan(10);
    let fast = 0;
    for (const f of files) if (agrees(readFileSync(f, "utf8"))) fast++;
    // the corpus is mostly well-formed plans with bad values: most of them take the fast path
    expect(fast).toBeGreaterThan(files.length / 2);
  });

  it("gives up on the syntax the subset leaves to the library", () => {
    for (const name of ["alias-bomb.yaml", "duplicate-key.yaml", "multi-doc.yaml", "syntax-nested-colon.yaml", "syntax-tab-indent.yaml", "syntax-unclosed-flow.yaml", "syntax-json.json", "json-table-truncated.json", "blank.yaml"]) {
      expect(fastParse(readFileSync(join(CORPUS, name), "utf8")), name).toBeUndefined();
    }
  });

  it("reads a generated 300-router benchmark plan on the fast path, with the library's value", async () => {
    const gen = (await import(pathToFileURL(join(ROOT, "bench/gen.mjs")).href)) as { planYaml(routers: number, seed: number): string };
    const dir = mkdtempSync(join(tmpdir(), "sidcarve-fast-yaml-"));
    try {
      const file = join(dir, "plan.yaml");
      writeFileSync(file, gen.planYaml(300, 7));
      const text = readFileSync(file, "utf8");
      expect(agrees(text)).toBe(true);
      expect(agrees(text.replace(/\n/g, "\r\n"))).toBe(true);
      const fast = loadPlanText(text, file);
      expect(fast.ok).toBe(true);
      expect(fast).toEqual(withoutLocate(loadPlanText(text, file, { fast: false })));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("reads the same plan written as JSON on the fast path", () => {
    const text = readFileSync(join(SAMPLES, "harbourline-metro.yaml"), "utf8");
    const data = reference(text).value;
    expect(agrees(JSON.stringify(data))).toBe(true);
    expect(agrees(JSON.stringify(data, null, 2))).toBe(true);
  });
});

/** A load result with plan.locate dropped (functions never compare equal); the rest must match. */
function withoutLocate(r: ReturnType<typeof loadPlanText>): unknown {
  if (!r.ok) return r;
  const { locate: _locate, ...plan } = r.plan;
  return { ok: true, plan: { ...plan, locate: expect.any(Function) } };
}

describe("core-schema scalars", () => {
  it("resolves plain scalars as the library does", () => {
    const texts = ["0x1F", "0X1F", "0x", "012", "0o17", "0o8", "+1", "-0", "+0", "-1", "1e3", "1E+3", "1e", ".5", "5.", "+.5", "-.inf", "+.inf", ".Inf", ".INF", ".NaN", ".nan", ".NAN", "-.nan", "+.NaN", ".nAn",
      "True", "TRUE", "true", "tRUE", "False", "FALSE", "yes", "no", "on", "off", "~", "~~", "null", "Null", "NULL", "nULL", "nil", "", "1_000", "0b101", "123456789012345678901234567890", "1e400", "-1e400", "12:30", "5f00::1", "fe80::1", "é", "NaN", "Infinity"];
    for (const t of texts) {
      const ref = reference(`v: ${t}\n`);
      expect(ref.errors, t).toBe(0);
      expect(Object.is(resolvePlain(t), (ref.value as { v: unknown }).v), t).toBe(true);
    }
  });
});

// ---- random YAML from a grammar

/**
 * Scalar texts on the edges of plain-scalar resolution that are still valid plain scalars in
 * block and flow context, so that documents made of them often take the fast path.
 */
const PLAIN_OK = [
  "0x1F", "0x1f", "0X1F", "012", "+1", "-1", "-0", "+0", "1e3", "1E-3", "1e", ".5", "1.", "+.5", "-.inf", "+.inf", ".Inf", ".NaN", ".nan", "-.nan",
  "True", "TRUE", "tRUE", "false", "yes", "no", "on", "off", "~", "null", "Null", "NULL", "nULL", "0o17", "0o8", "123456789012345678901234567890", "1e400",
  "a#b", "a b", "a  b", "a ", "é", "名前", "\u00e9t\u00e9", "a:b", "5f00::1", "5f00:0:100::/48", "12:30", "1_0", "0b1", "-x", "--x", "x.y", "a'b", "a\"b",
  "a\\b", "constructor", "toString", "hasOwnProperty", "x-", "x?", "x!", "x&y", "x*y", "x|y", "x>y", "x%", "x@y", "x`", ".", "..", "-.", "+",
];
/** Texts that break the syntax, or sit outside the subset, in some context or other. */
const PLAIN_BAD = [
  "", "a: b", "a #b", "- x", "-", "[x]", "{x}", "x]", "x}", "x,y", "'q'", "\"q\\n\"", "#x", "x:", "x::", "5f00::", ":x", "&a", "*a", "!t", "%x", "@x", "`x",
  "|", ">", "?", "? x", "<<", "__proto__", "---", "...", "--- x", "a\tb", "x\u00a0", "\u2028", "a\nb", " a", "\"\\u00e9\"", "\"\\x41\"", "\"\\q\"", "'it''s'",
];

const word = fc.stringMatching(/^[a-z][a-z0-9-]{0,6}$/);
const letters = fc.stringMatching(/^\p{L}[\p{L}\p{N}._-]{0,4}$/u);
type Style = "plain" | "single" | "double" | "raw";
type Scalar = { text: string; style: Style };
const goodScalar: fc.Arbitrary<Scalar> = fc.oneof(
  { weight: 4, arbitrary: fc.record({ text: fc.oneof(fc.constantFrom(...PLAIN_OK), word, letters), style: fc.constant<Style>("plain") }) },
  { weight: 2, arbitrary: fc.record({ text: fc.oneof(fc.constantFrom(...PLAIN_OK, ...PLAIN_BAD), word, fc.string({ maxLength: 5, unit: "grapheme" })), style: fc.constantFrom<Style>("single", "double") }) },
);
const badScalar: fc.Arbitrary<Scalar> = fc.record({
  text: fc.oneof(fc.constantFrom(...PLAIN_BAD), fc.string({ maxLength: 5 })),
  style: fc.constantFrom<Style>("plain", "plain", "single", "double", "raw"),
});
/** Mostly good scalars; now and then one that may break the document. */
const scalar = fc.oneof({ weight: 12, arbitrary: goodScalar }, { weight: 1, arbitrary: badScalar });
/** Keys: mostly words; a few from a tiny set (so some mappings repeat a key, maybe quoted differently). */
const key: fc.Arbitrary<Scalar> = fc.oneof(
  { weight: 12, arbitrary: word.map((text) => ({ text, style: "plain" as Style })) },
  { weight: 1, arbitrary: fc.record({ text: fc.constantFrom("a", "b"), style: fc.constantFrom<Style>("plain", "single", "double") }) },
  { weight: 4, arbitrary: goodScalar },
  { weight: 2, arbitrary: badScalar },
);

/** How an entry is laid out. Small values are the usual layout; the rare ones test the edges. */
const deco = fc.record({
  comment: fc.nat({ max: 12 }),
  indent: fc.oneof({ weight: 30, arbitrary: fc.constant(0) }, { weight: 1, arbitrary: fc.constantFrom(-1, 1, 2) }),
  blank: fc.nat({ max: 12 }),
  form: fc.nat({ max: 5 }),
  space: fc.constantFrom("", " ", " ", " ", "  "),
  odd: fc.nat({ max: 40 }),
});
type Deco = { comment: number; indent: number; blank: number; form: number; space: string; odd: number };

type Tree = { kind: "scalar"; s: Scalar } | { kind: "map"; flow: boolean; entries: { key: Scalar; value: Tree; d: Deco }[] } | { kind: "seq"; flow: boolean; items: { value: Tree; d: Deco }[] };

const { tree, top } = fc.letrec<{ tree: Tree; top: Tree; map: Tree; seq: Tree; leaf: Tree }>((tie) => ({
  top: fc.oneof({ depthSize: "small" }, tie("map"), tie("map"), tie("seq"), tie("leaf")),
  tree: fc.oneof({ depthSize: "small", withCrossShrink: true }, tie("leaf"), tie("map"), tie("seq")),
  leaf: scalar.map((s) => ({ kind: "scalar" as const, s })),
  map: fc.record({
    kind: fc.constant("map" as const),
    flow: fc.boolean(),
    entries: fc.array(fc.record({ key, value: tie("tree"), d: deco }), { maxLength: 5 }),
  }),
  seq: fc.record({ kind: fc.constant("seq" as const), flow: fc.boolean(), items: fc.array(fc.record({ value: tie("tree"), d: deco }), { maxLength: 5 }) }),
}));

function renderScalar(s: Scalar): string {
  switch (s.style) {
    case "plain":
      return s.text;
    case "single":
      return `'${s.text.replace(/'/g, "''")}'`;
    case "double":
      return JSON.stringify(s.text);
    case "raw":
      // inside double quotes as written: backslashes stay escapes, valid or not
      return `"${s.text}"`;
  }
}

/** A trailing comment, mostly proper; `#x` glued to the value is not a comment. */
const comment = (d: Deco) => (d.comment === 0 ? " # note" : d.comment === 1 ? "  #" : d.comment === 2 && d.odd === 0 ? "#x" : "");
const sp = (n: number) => " ".repeat(Math.max(0, n));
type Entry = { key?: Scalar; value: Tree; d: Deco };
const entriesOf = (t: Tree & { kind: "map" | "seq" }): Entry[] => (t.kind === "map" ? t.entries : t.items);
const isInline = (t: Tree) => t.kind === "scalar" || t.flow || entriesOf(t).length === 0;

/**
 * Flow text of a tree. Entries go on new lines indented `col` (form 0), or stay on one line;
 * the rare layouts put a space before a comma, drop the space after a colon, add a trailing
 * comma or a comment.
 */
function renderFlow(t: Tree, col: number): string {
  if (t.kind === "scalar") return renderScalar(t.s);
  const es = entriesOf(t);
  const nl = (d: Deco) => (d.form === 0 ? "\n" + sp(col + (d.odd === 1 ? -1 : d.odd === 2 ? 2 : 0)) + (d.comment === 3 ? "# c\n" + sp(col) : "") : "");
  let body = "";
  for (const [i, e] of es.entries()) {
    const d = e.d;
    if (i > 0) body += (d.odd === 3 ? " ," : ",") + (d.form === 0 ? nl(d) : d.space);
    else body += d.form === 0 ? nl(d) : d.space;
    body += e.key ? `${renderScalar(e.key)}:${d.odd === 4 ? "" : " "}${d.space}${renderFlow(e.value, col)}` : renderFlow(e.value, col);
    if (d.comment === 4) body += " # c\n" + sp(col);
  }
  const last = es[es.length - 1]?.d;
  const end = (last?.odd === 5 ? "," : "") + (last?.form === 1 ? "\n" + sp(col - 1) : last?.space ?? "");
  return t.kind === "map" ? `{${body}${end}}` : `[${body}${end}]`;
}

/** Block text of a tree as lines, the first starting in column `col`; `parent` is the column of the collection around it. */
function renderBlock(t: Tree, col: number, parent: number, step: number): string[] {
  if (isInline(t)) return [sp(col) + renderFlow(t, parent + 1)];
  const out: string[] = [];
  const m = t as Tree & { kind: "map" | "seq" };
  for (const e of entriesOf(m)) {
    const d = e.d;
    const at = col + d.indent;
    if (d.blank === 0) out.push("");
    if (d.blank === 1) out.push(sp(at + (d.odd % 5) - 2) + "# a comment line");
    if (d.blank === 2) out.push(sp(d.odd % 3));
    const head = e.key ? `${renderScalar(e.key)}:` : "-";
    const v = e.value;
    if (isInline(v) && !(d.form === 4 && d.odd < 20)) {
      out.push(sp(at) + head + " " + d.space + renderFlow(v, at + 1) + comment(d));
    } else if (m.kind === "seq" && d.form <= 2 && !isInline(v)) {
      // compact: the child's first line goes on the dash line
      const inner = renderBlock(v, at + 1 + step, at, step);
      out.push(sp(at) + "-" + sp(step) + inner[0]!.trimStart(), ...inner.slice(1));
    } else if (m.kind === "map" && v.kind === "seq" && d.form === 3) {
      out.push(sp(at) + head + comment(d), ...renderBlock(v, at, at, step)); // a list at the key's indent
    } else {
      out.push(sp(at) + head + comment(d), ...renderBlock(v, at + step, at, step));
    }
  }
  return out;
}

const doc = fc.record({
  t: top,
  step: fc.constantFrom(1, 2, 2, 2, 3, 4),
  crlf: fc.nat({ max: 4 }),
  marker: fc.nat({ max: 12 }),
  finalNewline: fc.boolean(),
  json: fc.nat({ max: 5 }),
});

function renderDoc(d: { t: Tree; step: number; crlf: number; marker: number; finalNewline: boolean; json: number }): string {
  let lines = d.json === 0 ? [renderFlow(d.t, 1)] : renderBlock(d.t, 0, -1, d.step);
  if (d.marker === 0) lines = ["---", ...lines];
  if (d.marker === 1) lines = ["# leading comment", "--- # start", ...lines];
  if (d.marker === 2) lines = [...lines, "..."];
  if (d.marker === 3) lines = [...lines, "---", "x: 1"];
  let text = lines.join("\n") + (d.finalNewline ? "\n" : "");
  if (d.crlf === 0) text = text.replace(/\n/g, "\r\n");
  return text;
}

/** Hand-picked layouts around the edges of the subset: flow indentation, trailing commas, compact nesting, keys, colons, comments. */
const EDGE_CASES = [
    "a: [1,\n 2]\n", "a: [1,\n2]\n", "- [1,\n 2]\n", "- [1,\n2]\n", "- a: [1,\n  2]\n", "- a: [1,\n   2]\n", "[1,\n2]\n", "key:\n  [a,\n  b]\n",
    "key:\n  [a,\n b]\n", "a: [\n  1\n ]\n", "a: [\n  1\n]\n", "a: {\n  b: 1\n}\n", "{\"a\":1}", "{\"a\":b}", "[\"a\":1]", "{'a':1}",
    "[a, # c\n b]\n", "[a,\n# c\n b]\n", "[a\n# c\n, b]\n", "a: b #c\n", "a: b c\n", "[-x, -1]\n", "- -1\n", "- - a\n  - b\n", "-  - a\n   - b\n",
    "a:\n- x\n- y\nb: 1\n", "a:\n  b: 1\n# c\n  c: 2\n", "- a:\n  b: 1\n", "- a:\n  - x\n", "a:\n- x\nb:\n", "[a,\n   \n b]\n", "{ a: 1 }\n",
    "{a: 1, b: [x, y]}\n", "a: 'x''y'\n", "a: \"\\u00e9\\t\"\n", "a: x:y\n", "a: [x:y]\n", "a: {x:y}\n", "a: [a b, c]\n", "a: [a  , b  ]\n",
    "[\n  1,\n  2\n]\n", "{\n  \"a\": {\n    \"b\": [1, 2]\n  }\n}\n", "-\n  a: 1\n", "- \n- x\n", "a:    \n  b\n", "a: -\n",
    "a:\n  - b\n  -\n  - c\n", "? a\n", "a: 1\n...\n", "--- \na: 1\n", "---\n---\n", "a: [1, [2, [3]]]\n", "a: [{b: 1}, {c: [d]}]\n",
    "a: {b: {c: {}}}\n", "\"a\": 1\n'b': 2\n", "a : 1\n", "a:1\n", "a: 'b' # c\n", "a: \"b\"#c\n", "x\n", "x # c\n", "\"x\"\n", "[x]\n", "[x] # c\n",
    "{x: 1}: 2\n", "a: [b]c\n", "a: b\n c: d\n", "   a: 1\n   b: 2\n", "  - a\n  - b\n", "a:\n    - b\n  c: 1\n", "a: 5f00::1\n",
    "a: [5f00::1, 5f00::]\n", "a: [5f00::/48]\n", "a: !!str 1\n", "a: b, c\n", "a: b]\n", "a: [b]]\n", "a: {b: c}}\n", "a:\n\n\n  b\n", "a: \"\"\n",
    "a: ''\n", "a: ~\n", "a:\n", "a: # c\n  b: 1\n", "- a: 1\n  b: 2\n- c: 3\n", "- a: 1\n   b: 2\n", "- a: 1\n b: 2\n",
    "a: [b, {c: d, e: [f]}, g]\n", "a: {b: [c, d], e: f}\n", "[a, b, ]\n", "{a: b, }\n", "a: [\n]\n", "a: {\n}\n", "a: [\n  b,\n  c\n  ]\n",
    "a: [ b , c ]\n", "[\"a\" , \"b\"]\n", "{\"a\" : 1}\n", "{\"a\":\n 1}\n", "{a:\n 1}\n", "{a: \n 1}\n", "- [a]\n- {b: c}\n", "- 'a': b\n",
    "- \"a\": b\n  c: d\n", "a: 'it''s'\n", "'a''b': 1\n", "a: \"\\/\\\\\\\"\"\n", "a: \"\\x41\\U0001F600\\ud83d\"\n", "a: [x\n  , y]\n",
    "a: [x # c\n  , y]\n", "{ a: 1, b: 2,\n  c: 3 }\n", "a: {b: c,\n d: e}\n", "a: {b: c,\nd: e}\n", "- {b: c,\n  d: e}\n", "- {b: c,\n d: e}\n",
    "a:\n  - {b: c,\n    d: e}\n", "a:\n  - {b: c,\n   d: e}\n", "a:\n  - {b: c,\n  d: e}\n", "a:\n- {b: c,\n d: e}\n", "a:\n- {b: c,\nd: e}\n",
    "- a: [\n    1\n  ]\n", "- a: [\n    1\n ]\n", "a:\n  - [\n  ]\n", "a:\n  - [\n ]\n", "a: [1,\n]\n", "a: {\n  b: 1\n}\nc: 2\n", "[a,]\n", "[,]\n",
    "[a,,]\n", "{a: 1,}\n", "a: [\n  [1,\n  2\n]\n]\n", "a: [\n  [1,\n  2\n ]\n]\n", "a: [\n# c\n]\n", "a: { b: [\n] }\n", "a: [\n]: 1\n",
    "a: [x,\n] # c\n", "[a, # c\n]", "{\"a\": 1,}", "a: [\n  1\n]x\n", "a: [\n  1\n]\n  b\n", "a:\n  b: [\n ]\n", "a:\n  b: [\n  ]\n", "- [\n]\n",
    "a#b: 1\n", "a: ---x\n", "a: ...x\n", "a: -.\n", "a: .\n", "a: +\n", "- -\n", "- - - a\n", "-\n  - a\n", "-\n-\n", "a\"b: 1\n", "\"\": 1\n",
    "a:\n  - x\nb:\n    - y\n", "{\"a\": \"\\ud83d\\ude00\"}", "\"a\\nb\": 1\n", "a:: b\n", "x:y: z\n", "[b'c]\n", "a: 0x\n", "a: 00\n", "a: 09\n",
    "[+]\n", "[-]\n", "- - a: 1\n    b: 2\n", "a:  \n", "[a]\n[b]\n", "a\n---\n", "a: - b\n", "- a:   \n  b: c\n", "[x:]\n", "[x::]\n", "{a: x:}\n",
    "[5f00::]\n", "{a: 5f00::}\n", "{a: [x:], b: 1}\n", "a: [x:]\n", "{a: 1, a: 2}\n", "{a: 1, 'a': 2}\n", "- {a: 1, \"a\": 2}\n", "a: 1\n'a': 2\n",
    "- a: 1\n  a: 2\n", "a:\n  b: 1\n  b: 2\n",
];

describe("fastParse on random YAML", () => {
  it("agrees with the library on hand-picked edge cases, and takes most of them", () => {
    let fast = 0;
    for (const t of EDGE_CASES) if (agrees(t)) fast++;
    expect(fast).toBeGreaterThan(EDGE_CASES.length / 2);
  });

  it("agrees with the library on block and flow documents built from tricky pieces", () => {
    let fast = 0;
    let runs = 0;
    fc.assert(
      fc.property(doc, (d) => {
        runs++;
        if (agrees(renderDoc(d))) fast++;
      }),
      { seed: 0x5ca1ab1e, numRuns: 600 },
    );
    // the grammar must reach the fast path often enough to test it
    expect(fast).toBeGreaterThan(runs / 5);
  });

  it("agrees with the library on JSON text of random values", () => {
    const json = fc.jsonValue({ maxDepth: 4 });
    let fast = 0;
    fc.assert(
      fc.property(json, fc.constantFrom(0, 1, 2, 4), (v, indent) => {
        if (agrees(JSON.stringify(v, null, indent))) fast++;
      }),
      { seed: 0x15011, numRuns: 400 },
    );
    expect(fast).toBeGreaterThan(100);
  });

  it("agrees with the library on sample plans with a few tokens edited", () => {
    const texts = filesIn(SAMPLES, /\.ya?ml$/).map((f) => readFileSync(f, "utf8"));
    const tokenize = (s: string) => s.match(/\r?\n|[ ]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*'|[[\]{}:,#&*!|>-]|[^\s[\]{}:,#&*!|>"'-]+/g) ?? [];
    const toks = texts.map(tokenize);
    const piece = fc.oneof(fc.constantFrom(...PLAIN_OK, ...PLAIN_BAD, "\n", " ", "  ", ": ", ", ", "[", "]", "{", "}", "- ", "#", "\r\n"), fc.string({ maxLength: 3 }));
    const edit = fc.record({ at: fc.nat(), op: fc.constantFrom("delete", "insert", "replace", "duplicate"), piece });
    let fast = 0;
    fc.assert(
      fc.property(fc.nat({ max: toks.length - 1 }), fc.array(edit, { minLength: 1, maxLength: 3 }), (which, edits) => {
        const t = [...toks[which]!];
        for (const e of edits) {
          const at = e.at % t.length;
          if (e.op === "delete") t.splice(at, 1);
          else if (e.op === "insert") t.splice(at, 0, e.piece);
          else if (e.op === "replace") t[at] = e.piece;
          else t.splice(at, 0, t[at]!);
        }
        if (agrees(t.join(""))) fast++;
      }),
      { seed: 0xed17, numRuns: 200 },
    );
    expect(fast).toBeGreaterThan(20);
  });

  it("gives up on YAML outside the subset", () => {
    const outside = [
      "a: &x 1\nb: *x\n", "a: !t 1\n", "a: |\n  text\n", "a: >\n  text\n", "a: b\n  c\n", "a: 'b\n  c'\n", "? a\n: b\n", "%YAML 1.2\n---\na: 1\n",
      "a: 1\n---\nb: 2\n", "a:\n\t- x\n", "a: 1\na: 2\n", "1: x\n", "true: x\n", "__proto__: x\n", "<<: {a: 1}\n", "a: \"\\q\"\n", "[a: b]\n", "[a,,b]\n", "[,]\n",
      "a: [1,\n2]\n", "a: b: c\n", "- a\n b\n", "a: 1 # c\n b: 2\n", "a:\n  - x\n  b: 1\n", "", "# only\n", "a: 1\r", "x".repeat(1100) + ": 1\n",
    ];
    for (const t of outside) expect(fastParse(t), JSON.stringify(t)).toBeUndefined();
  });
});

// ---- diagnostics do not depend on the path

describe("diagnostics are the same on the fast and the full path", () => {
  const base = readFileSync(join(CORPUS, "valid-base.yaml"), "utf8");
  const variants: Record<string, string> = {
    "a schema error (negative bits)": base.replace("bits: 8", "bits: -8"),
    "an unknown key": base.replace("plan: quillmere", "plan: quillmere\ncolour: teal"),
    "a bad block prefix (normalize)": base.replace(/prefix: [^\n]*/, "prefix: 5f00:0:2200::1/48"),
    "a list instead of a mapping": "- a\n- b\n",
    "a string where a list is due": base.replace(/^nodes:/m, "nodes: none\nold-nodes:"),
  };
  for (const [what, text] of Object.entries(variants)) {
    it(what, () => {
      expect(text).not.toBe(base);
      expect(fastParse(text)).not.toBeUndefined();
      const fast = loadPlanText(text, "bad.yaml");
      expect(fast.ok).toBe(false);
      expect(fast).toEqual(loadPlanText(text, "bad.yaml", { fast: false }));
      if (!fast.ok) for (const d of fast.diagnostics) expect(d.location.line, d.message).toBeGreaterThan(0);
    });
  }

  it("leaves nesting deeper than the limit to the full path, with the same too-deep diagnostic", () => {
    const nested = (depth: number) => `sidcarve: 1\nplan: ${"[".repeat(depth - 1)}${"]".repeat(depth - 1)}\n`;
    expect(fastParse(nested(64), 64)).not.toBeUndefined();
    expect(fastParse(nested(65), 64)).toBeUndefined();
    for (const depth of [64, 65, 100, 130]) {
      const text = nested(depth);
      expect(parseSource(text, "deep.yaml")).toEqual({ ...parseSource(text, "deep.yaml", { fast: false }), ...(depth <= 64 ? { locate: expect.any(Function) } : {}) });
    }
    const deep = parseSource(nested(65), "deep.yaml");
    expect(deep.ok ? "" : deep.diagnostics[0]!.code).toBe("input/too-deep");
  });

  it("locates every path of a sample plan as the full path does", () => {
    const text = readFileSync(join(SAMPLES, "harbourline-metro.yaml"), "utf8");
    const a = parseSource(text, "p.yaml");
    const b = parseSource(text, "p.yaml", { fast: false });
    if (!a.ok || !b.ok) throw new Error("sample plan did not parse");
    expect(same(a.data, b.data)).toBe(true);
    const paths: (string | number)[][] = [];
    const walk = (v: unknown, path: (string | number)[]) => {
      paths.push(path);
      if (Array.isArray(v)) v.forEach((x, i) => walk(x, [...path, i]));
      else if (v !== null && typeof v === "object") for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
    };
    walk(a.data, []);
    paths.push(["nodes", 999], ["no-such-key", "deeper"]);
    for (const p of paths) {
      expect(a.locate(p), p.join(".")).toEqual(b.locate(p));
      expect(a.locate(p, { key: true }), p.join(".")).toEqual(b.locate(p, { key: true }));
    }
  });
});

// ---- locating paths from the fast reader's own positions

/** Every path into the data (all keys and indices, recursively), and paths that leave it at each level. */
function pathsOf(data: unknown): (string | number)[][] {
  const out: (string | number)[][] = [];
  const walk = (v: unknown, path: (string | number)[]) => {
    out.push(path);
    if (Array.isArray(v)) {
      v.forEach((x, i) => walk(x, [...path, i]));
      out.push([...path, v.length], [...path, -1], [...path, 0.5], [...path, "0"], [...path, 0, "deeper"]);
    } else if (v !== null && typeof v === "object") {
      for (const [k, x] of Object.entries(v)) walk(x, [...path, k]);
      out.push([...path, "no-such-key"], [...path, "no-such-key", 3], [...path, 0]);
    } else out.push([...path, "below-a-scalar"], [...path, 0]);
  };
  walk(data, []);
  return out;
}

/**
 * When the fast reader takes the text, its locate gives what the full path's gives for every path,
 * with and without `key`. Returns whether it took the text.
 */
function locatesAgree(text: string): boolean {
  if (fastParse(text, MAX_DEPTH) === undefined) return false;
  const a = parseSource(text, "p.yaml");
  const b = parseSource(text, "p.yaml", { fast: false });
  if (!a.ok || !b.ok) throw new Error(`${JSON.stringify(text)} did not parse on both paths`);
  for (const p of pathsOf(b.data)) {
    const what = `${JSON.stringify(text.length > 300 ? text.slice(0, 300) + "..." : text)} at ${JSON.stringify(p)}`;
    expect(a.locate(p), what).toEqual(b.locate(p));
    expect(a.locate(p, { key: true }), what).toEqual(b.locate(p, { key: true }));
  }
  return true;
}

describe("locate on the fast path, without the library", () => {
  it("locates every path of every sample plan as the full path does, LF and CRLF", () => {
    const files = filesIn(SAMPLES, /\.(ya?ml|json)$/);
    for (const f of files) {
      const text = readFileSync(f, "utf8");
      expect(locatesAgree(text), f).toBe(true);
      expect(locatesAgree(text.replace(/\n/g, "\r\n")), f).toBe(true);
    }
  });

  it("locates every path of a generated benchmark plan, LF and CRLF", async () => {
    const gen = (await import(pathToFileURL(join(ROOT, "bench/gen.mjs")).href)) as { planYaml(routers: number, seed: number): string };
    const text = gen.planYaml(50, 3);
    expect(locatesAgree(text)).toBe(true);
    expect(locatesAgree(text.replace(/\n/g, "\r\n"))).toBe(true);
  });

  it("locates every path of the hostile-corpus files that take the fast path", () => {
    let fast = 0;
    for (const f of filesIn(CORPUS, /\.(ya?ml|json)$/)) if (locatesAgree(readFileSync(f, "utf8"))) fast++;
    expect(fast).toBeGreaterThan(10);
  });

  it("locates every path of the hand-picked edge cases, LF and CRLF", () => {
    let fast = 0;
    for (const t of EDGE_CASES) {
      if (locatesAgree(t)) fast++;
      locatesAgree(t.replace(/\n/g, "\r\n"));
    }
    expect(fast).toBeGreaterThan(EDGE_CASES.length / 2);
  });

  it("locates every path of random block and flow documents", () => {
    let fast = 0;
    let runs = 0;
    fc.assert(
      fc.property(doc, (d) => {
        runs++;
        if (locatesAgree(renderDoc(d))) fast++;
      }),
      { seed: 0x10ca7e, numRuns: 600 },
    );
    expect(fast).toBeGreaterThan(runs / 5);
  });

  it("locates every path of random JSON text", () => {
    let fast = 0;
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 4 }), fc.constantFrom(0, 1, 2), (v, indent) => {
        if (locatesAgree(JSON.stringify(v, null, indent))) fast++;
      }),
      { seed: 0x15012, numRuns: 300 },
    );
    expect(fast).toBeGreaterThan(100);
  });

  it("counts columns in UTF-16 code units and lines past CRLF as the library does", () => {
    const text = "a: [\"\u{1F600}\", b]\r\n\u540d\u524d: x\r\nc:\r\n  - d\r\n  -\r\n";
    const r = parseSource(text, "u.yaml");
    if (!r.ok) throw new Error("did not parse");
    expect(fastParse(text)).not.toBeUndefined();
    expect(r.locate(["a", 1])).toEqual({ file: "u.yaml", line: 1, column: 11, path: ["a", 1] });
    expect(r.locate(["\u540d\u524d"])).toEqual({ file: "u.yaml", line: 2, column: 5, path: ["\u540d\u524d"] });
    expect(r.locate(["c", 0])).toEqual({ file: "u.yaml", line: 4, column: 5, path: ["c", 0] });
    expect(r.locate(["c", 1])).toEqual({ file: "u.yaml", line: 5, column: 4, path: ["c", 1] });
    expect(r.locate(["c", 1], { key: true })).toEqual(r.locate(["c", 1]));
    expect(r.locate(["c"])).toEqual({ file: "u.yaml", line: 3, column: 1, path: ["c"] });
    expect(locatesAgree(text)).toBe(true);
  });

  it("finds keys in a large mapping, numeric-looking and quoted keys included", () => {
    const keys = Array.from({ length: 300 }, (_, i) => (i % 3 === 0 ? `"${299 - i}"` : i % 3 === 1 ? `'k ${i}'` : `k${i}`));
    for (const flow of [false, true]) {
      const text = flow ? `m: {${keys.map((k, i) => `${k}: ${i}`).join(", ")}}\n` : `m:\n${keys.map((k, i) => `  ${k}: ${i}`).join("\n")}\n`;
      expect(locatesAgree(text)).toBe(true);
    }
  });
});
