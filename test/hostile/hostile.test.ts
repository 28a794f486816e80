/**
 * The hostile-input corpus through the built CLI (`allocate` for plans, `lint` and `diff` for
 * tables), bounded in time (20 s) and memory (512 MB heap): exit 2 with exactly one located
 * diagnostic and no stack trace for broken plans, located findings for broken tables, no file
 * left behind; names that become files or cells cannot escape the output folder or run as
 * spreadsheet formulas (OWASP CSV injection guidance).
 */
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parse } from "yaml";
import { csvCell, neutralizeCell } from "../../src/emit/names.js";
import { readCsvTable, readJsonTable } from "../../src/sid/table-read.js";
import { type BuiltCli, buildCli, runCli, stackLines } from "../reliability/built-cli.js";
import { CORPUS, type Case, type Outcome, cases, judge } from "./cases.js";

let built: BuiltCli;
let work: string;

beforeAll(() => {
  built = buildCli();
  work = mkdtempSync(join(tmpdir(), "sidcarve-hostile-"));
}, 180_000);

afterAll(() => {
  built?.dispose();
  if (work) rmSync(work, { recursive: true, force: true });
});

/** Every file under `dir` with a digest of its bytes. */
function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string) => {
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

/** Run one case in a folder of its own; returns the outcome and the folder. */
function runCase(c: Case, folder = c.id): { outcome: Outcome; dir: string } {
  const dir = join(work, folder);
  mkdirSync(dir, { recursive: true });
  const input = c.input();
  if (input === "dir") mkdirSync(join(dir, c.file));
  else writeFileSync(join(dir, c.file), input);
  for (const [name, bytes] of Object.entries(c.companions?.() ?? {})) writeFileSync(join(dir, name), bytes);
  const before = snapshot(dir);
  const r = runCli(built.main, [c.command, ...(c.args ?? [c.file])], dir);
  const after = snapshot(dir);
  const changedFiles = [...new Set([...before.keys(), ...after.keys()])].filter((k) => before.get(k) !== after.get(k)).sort();
  return { outcome: { code: r.code, timedOut: r.timedOut, stdout: r.stdout, stderr: r.stderr, changedFiles }, dir };
}

const all = cases();

describe("hostile corpus through the CLI", () => {
  for (const c of all) {
    const title = `${c.id}: ${c.about} -> ${c.expect.exit === 2 ? ("code" in c.expect ? c.expect.code : "exit 2") : c.expect.exit === 1 ? `findings (${c.expect.rule})` : "exit 0"}`;
    if (c.knownDefect) {
      // Reported, not fixed yet: this test passes while the defect is there and fails once it is
      // fixed, as a reminder to make it an ordinary case.
      it.fails(`${title} [known defect: ${c.knownDefect}]`, () => {
        expect(judge(c, runCase(c).outcome)).toEqual([]);
      }, 60_000);
      continue;
    }
    it(title, () => {
      const { outcome } = runCase(c);
      expect(judge(c, outcome), JSON.stringify({ ...outcome, stdout: outcome.stdout.slice(0, 2000) }, null, 2)).toEqual([]);
    }, 60_000);
  }

  it("the corpus folder holds only files some case uses (plus the documented helpers)", () => {
    const used = new Set(all.flatMap((c) => [c.file]));
    const extra = readdirSync(CORPUS).filter((f) => !used.has(f) && f !== "node-names.yaml");
    expect(extra).toEqual([]);
  });

  it("a byte-order mark or CRLF line ends give the same lock as the plain plan", () => {
    const lockOf = (id: string) => {
      const c = all.find((x) => x.id === id)!;
      const { outcome, dir } = runCase(c, `${id}-lock`);
      expect(outcome.code, outcome.stderr).toBe(0);
      return readFileSync(join(dir, `${c.file.replace(/\.yaml$/, "")}.lock.json`));
    };
    const plain = lockOf("valid-base");
    for (const id of ["bom", "crlf", "bom-crlf"]) expect(lockOf(id).equals(plain), id).toBe(true);
  });
});

describe("table readers on the hostile tables, directly", () => {
  it("never throw, and report each broken row with its row number", () => {
    for (const c of all.filter((x) => x.command !== "allocate" && /\.(csv|json)$/.test(x.file))) {
      const bytes = c.input() as Uint8Array;
      const text = new TextDecoder().decode(bytes);
      const read = c.file.endsWith(".csv") ? readCsvTable(text) : readJsonTable(text);
      if (c.expect.exit === 0) expect(read.problems, c.id).toEqual([]);
      if (c.expect.exit === 1 && c.expect.rule === "table-row") expect(read.problems.length, c.id).toBeGreaterThan(0);
      for (const p of read.problems) expect(p.row, c.id).toBeGreaterThanOrEqual(0);
    }
  });
});

/** Windows reserved device names, with or without an extension (Microsoft: "Naming Files, Paths, and Namespaces"). */
const DEVICE = /^(con|prn|aux|nul|com[0-9¹²³]|lpt[0-9¹²³])(\.|$)/i;

describe("names that become files or cells", () => {
  const planFile = "node-names.yaml";
  const nodes = (parse(readFileSync(join(CORPUS, planFile), "utf8")) as { nodes: { name: string }[] }).nodes.map((n) => n.name);

  it("node and plan names with separators, '..', device names or formula characters stay inside --out", () => {
    const dir = join(work, "names");
    mkdirSync(dir, { recursive: true });
    writeFileSync(join(dir, planFile), readFileSync(join(CORPUS, planFile)));
    const run = (...args: string[]) => {
      const r = runCli(built.main, args, dir);
      expect({ code: r.code, stderr: r.stderr }, r.stdout).toEqual({ code: 0, stderr: "" });
      expect(stackLines(r.stderr)).toEqual([]);
    };
    run("allocate", planFile);
    for (const format of ["csv", "json"]) run("emit", planFile, "--format", format, "--per-node", "--out", "out");
    run("emit", planFile, "--format", "csv", "--out", "out");
    const everything = [...snapshot(dir).keys()].sort();
    // nothing outside out/ but the plan and its lock; nothing in a sub-folder of out/
    expect(everything.filter((f) => !f.startsWith("out/"))).toEqual([planFile, "node-names.lock.json"].sort());
    const files = everything.filter((f) => f.startsWith("out/") && f !== "out/").map((f) => f.slice(4));
    expect(files.filter((f) => f.includes("/") || f.includes("\\"))).toEqual([]);
    for (const f of files) {
      expect(f, f).not.toMatch(DEVICE);
      expect(f.startsWith("."), f).toBe(false);
      expect(f, f).toMatch(/^[A-Za-z0-9._-]+$/);
      expect(f.length, f).toBeLessThanOrEqual(120);
    }
    // one file per node and format (no two names collapsed onto one file), plus the whole table
    expect(files.filter((f) => f.endsWith(".csv")).length).toBe(nodes.length + 1);
    expect(files.filter((f) => f.endsWith(".json")).length).toBe(nodes.length);

    // OWASP CSV injection: no cell may start with = + - @ tab or CR; a neutralised cell starts with '
    const cells: string[] = [];
    for (const f of files.filter((x) => x.endsWith(".csv"))) {
      const text = readFileSync(join(dir, "out", f), "utf8");
      expect(readCsvTable(text).problems, f).toEqual([]);
      for (const line of text.split("\r\n").slice(2)) if (line) cells.push(...rfc4180Cells(line));
    }
    expect(cells.filter((x) => /^[=+\-@\t\r]/.test(x))).toEqual([]);
    for (const n of nodes.filter((x) => /^[=+\-@]/.test(x))) expect(cells, n).toContain(`'${n}`);
  });

  it("neutralises leading =, +, -, @, tab and CR and quotes what RFC 4180 needs quoted", () => {
    // OWASP CSV Injection: prepend a single quote to cells starting with these characters
    for (const lead of ["=", "+", "-", "@", "\t", "\r"]) {
      expect(neutralizeCell(`${lead}1+1`)).toBe(`'${lead}1+1`);
    }
    expect(neutralizeCell("plain")).toBe("plain");
    expect(neutralizeCell("a=b")).toBe("a=b");
    // RFC 4180 §2: a field holding a comma, a quote or a line break is quoted, inner quotes doubled
    expect(csvCell('say "hi", then\r\nleave')).toBe('"say ""hi"", then\r\nleave"');
    expect(csvCell("\rline")).toBe(`"'\rline"`);
  });
});

/** Split one CSV record without embedded line breaks (RFC 4180 §2); an independent reader. */
function rfc4180Cells(line: string): string[] {
  const out: string[] = [];
  let i = 0;
  while (i <= line.length) {
    if (line[i] === '"') {
      let v = "";
      i++;
      for (;;) {
        const q = line.indexOf('"', i);
        if (q < 0) throw new Error(`unclosed quote in ${line}`);
        v += line.slice(i, q);
        if (line[q + 1] === '"') {
          v += '"';
          i = q + 2;
        } else {
          i = q + 1;
          break;
        }
      }
      out.push(v);
      i++; // the comma
    } else {
      const c = line.indexOf(",", i);
      const end = c < 0 ? line.length : c;
      out.push(line.slice(i, end));
      i = end + 1;
    }
    if (i > line.length) break;
  }
  return out;
}
