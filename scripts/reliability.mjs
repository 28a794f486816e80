// Re-runs the hostile-input corpus (test/hostile/cases.ts) through the built CLI, the names check,
// and the property and reliability tests, then rewrites the results part of docs/reliability.md
// (between the reliability:begin and reliability:end markers). Run it as `npm run reliability`.
// Output is deterministic: no timings, no dates, no temporary paths.
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import ts from "typescript";

const ROOT = fileURLToPath(new URL("../", import.meta.url));
const MAIN = join(ROOT, "dist", "cli", "main.js");
const DOC = join(ROOT, "docs", "reliability.md");
const CASES = join(ROOT, "test", "hostile", "cases.ts");
const NODE_FLAGS = ["--max-old-space-size=512"];
const TIMEOUT = 20_000;

/** Load cases.ts: transpile it (it uses Node built-ins only) and import the result. */
async function loadCases(dir) {
  const src = readFileSync(CASES, "utf8");
  let js = ts.transpileModule(src, { compilerOptions: { module: ts.ModuleKind.ESNext, target: ts.ScriptTarget.ES2022 } }).outputText;
  // the corpus folder is found from the module's own address: keep pointing at the original
  js = js.replaceAll("import.meta.url", JSON.stringify(pathToFileURL(CASES).href));
  const file = join(dir, "cases.mjs");
  writeFileSync(file, js);
  return import(pathToFileURL(file).href);
}

function snapshot(dir) {
  const out = new Map();
  const walk = (d) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      if (e.isDirectory()) {
        out.set(relative(dir, p) + "/", "dir");
        walk(p);
      } else out.set(relative(dir, p), createHash("sha256").update(readFileSync(p)).digest("hex"));
    }
  };
  walk(dir);
  return out;
}

function cli(args, cwd) {
  const r = spawnSync(process.execPath, [...NODE_FLAGS, MAIN, ...args], { cwd, encoding: "utf8", timeout: TIMEOUT, maxBuffer: 64 * 1024 * 1024, env: { ...process.env, NO_COLOR: "1" } });
  return { code: r.status, timedOut: r.error?.code === "ETIMEDOUT", stdout: r.stdout ?? "", stderr: r.stderr ?? "" };
}

const cell = (s) => String(s).replace(/\|/g, "\\|").replace(/\r?\n/g, " ").replace(/[\u0000-\u001f\u007f]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`);
const clip = (s, n = 160) => (s.length > n ? s.slice(0, n - 3) + "..." : s);

function expectedText(e) {
  if (e.exit === 2) return "code" in e ? `exit 2, \`${e.code}\`${e.line !== undefined ? ` on line ${Array.isArray(e.line) ? e.line.join("-") : e.line}` : ""}` : "exit 2, a message naming the input";
  if (e.exit === 1) return `exit 1, \`${e.rule}\` findings${e.lines ? ` on line ${e.lines.join(", ")}` : ""}`;
  return "exit 0";
}

/** Run vitest on some files with the JSON reporter; returns [title, status] rows. */
function vitest(files, dir) {
  const out = join(dir, `vitest-${createHash("sha256").update(files.join(",")).digest("hex").slice(0, 8)}.json`);
  spawnSync("npx", ["vitest", "run", ...files, "--reporter=json", `--outputFile=${out}`], { cwd: ROOT, stdio: "ignore" });
  let data;
  try {
    data = JSON.parse(readFileSync(out, "utf8"));
  } catch {
    return [[files.join(", "), "did not run"]];
  }
  const rows = [];
  for (const f of [...data.testResults].sort((a, b) => (a.name < b.name ? -1 : 1))) {
    for (const t of f.assertionResults) rows.push([`${relative(ROOT, f.name)}: ${[...t.ancestorTitles, t.title].join(" > ")}`, t.status]);
  }
  return rows;
}

async function main() {
  const work = mkdtempSync(join(tmpdir(), "sidcarve-reliability-"));
  const lines = [];
  let differs = 0;
  try {
    const mod = await loadCases(work);
    const all = mod.cases();
    // ---- the corpus
    const rows = [];
    for (const c of all) {
      const dir = join(work, "case-" + c.id);
      mkdirSync(dir, { recursive: true });
      const input = c.input();
      if (input === "dir") mkdirSync(join(dir, c.file));
      else writeFileSync(join(dir, c.file), input);
      for (const [name, bytes] of Object.entries(c.companions?.() ?? {})) writeFileSync(join(dir, name), bytes);
      const before = snapshot(dir);
      const r = cli([c.command, ...(c.args ?? [c.file])], dir);
      const after = snapshot(dir);
      const changedFiles = [...new Set([...before.keys(), ...after.keys()])].filter((k) => before.get(k) !== after.get(k)).sort();
      const outcome = { ...r, changedFiles };
      const bad = mod.judge(c, outcome);
      let verdict;
      if (c.knownDefect) verdict = bad.length ? `known defect (reported): ${c.knownDefect}` : "fixed: make it an ordinary case";
      else if (bad.length) {
        verdict = `DIFFERS: ${bad.join("; ")}`;
        differs++;
      } else verdict = "as expected";
      const said = r.timedOut ? `(stopped after ${TIMEOUT / 1000} s)` : r.code === 0 ? clip(r.stdout.split("\n").find((l) => l.trim()) ?? "") : mod.firstMessage(outcome);
      rows.push(`| ${cell(c.id)} | ${cell(c.about)} | \`${c.command}\` | ${expectedText(c.expect)} | ${r.timedOut ? "timed out" : r.code} | ${cell(clip(said))} | ${cell(verdict)} |`);
    }
    const asExpected = rows.filter((r) => r.endsWith("| as expected |")).length;
    lines.push(`### Hostile corpus (${all.length} cases: ${asExpected} as expected, ${all.filter((c) => c.knownDefect).length} known defect, ${differs} differing)`, "");
    lines.push("Each case ran in a folder of its own with `node --max-old-space-size=512 dist/cli/main.js`, stopped after 20 s.", "");
    lines.push("| case | input | command | expected | exit | what sidcarve said | verdict |", "| --- | --- | --- | --- | --- | --- | --- |", ...rows, "");

    // ---- names that become files
    const nd = join(work, "names");
    mkdirSync(nd);
    writeFileSync(join(nd, "node-names.yaml"), readFileSync(join(ROOT, "test", "hostile", "corpus", "node-names.yaml")));
    const steps = [cli(["allocate", "node-names.yaml"], nd), cli(["emit", "node-names.yaml", "--format", "json", "--per-node", "--out", "out"], nd), cli(["emit", "node-names.yaml", "--format", "csv", "--out", "out"], nd)];
    lines.push("### Names that become files (test/hostile/corpus/node-names.yaml, `emit --per-node --out out`)", "");
    if (steps.some((s) => s.code !== 0)) {
      lines.push(`DIFFERS: a step failed: ${cell(steps.map((s) => s.stderr.trim()).join(" / "))}`, "");
      differs++;
    } else {
      const files = readdirSync(join(nd, "out")).sort();
      const names = [];
      for (const f of files.filter((x) => x.endsWith(".json"))) names.push([JSON.parse(readFileSync(join(nd, "out", f), "utf8")).nodes[0].node, f]);
      const csvFile = files.find((f) => f.endsWith(".csv"));
      const planName = readFileSync(join(nd, "node-names.yaml"), "utf8").match(/^plan: (.*)$/m)?.[1] ?? "";
      names.push([`(plan) ${planName}`, csvFile ?? "(none)"]);
      const outside = [...snapshot(nd).keys()].filter((k) => !k.startsWith("out/") && !["node-names.yaml", "node-names.lock.json"].includes(k));
      lines.push(`${files.length} files, all directly inside out/; files written outside it: ${outside.length ? outside.join(", ") : "none"}.`, "");
      lines.push("| name in the plan | file written |", "| --- | --- |", ...names.sort((a, b) => (a[1] < b[1] ? -1 : 1)).map(([n, f]) => `| \`${cell(n)}\` | \`${cell(f)}\` |`), "");
    }

    // ---- tests
    const testRows = vitest(["test/hostile/mutations.test.ts", "test/reliability/nothing-lost.test.ts", "test/reliability/interrupted.test.ts", "test/diff/diff.test.ts", "test/diff/cli.test.ts"], work);
    const failed = testRows.filter(([, s]) => s !== "passed").length;
    differs += failed;
    lines.push(`### Property and reliability tests (${testRows.length} tests, ${failed} not passing)`, "");
    lines.push("| test | result |", "| --- | --- |", ...testRows.map(([t, s]) => `| ${cell(t)} | ${s} |`), "");
  } finally {
    rmSync(work, { recursive: true, force: true });
  }

  const doc = readFileSync(DOC, "utf8");
  const begin = "<!-- reliability:begin (written by scripts/reliability.mjs) -->";
  const end = "<!-- reliability:end -->";
  const a = doc.indexOf(begin);
  const b = doc.indexOf(end);
  if (a < 0 || b < a) throw new Error(`${DOC}: the markers ${begin} and ${end} are missing`);
  writeFileSync(DOC, doc.slice(0, a + begin.length) + "\n\n" + lines.join("\n") + "\n" + doc.slice(b));
  console.log(`docs/reliability.md rewritten; ${differs} result${differs === 1 ? "" : "s"} differ from what is expected`);
  process.exitCode = differs > 0 ? 1 : 0;
}

await main();
