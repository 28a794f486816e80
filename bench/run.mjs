// `npm run bench`: times sidcarve on synthetic plans of 1,000, 5,000 and 20,000 routers, per stage
// (the library, in a child process per stage) and as whole processes (the CLI), checks that the
// planted defects of each table are found, runs the same overlap/containment job in Python 3's
// ipaddress and in three TypeScript forms, and writes docs/benchmarks.md.
// Timings are reported here and in the document only; no test asserts a timing.
//
// Options: --sizes 1000,5000,20000  --runs 3  --large-runs N (runs for sizes >= 20000; default 1)
// --seed 7  --timeout SECONDS (per child process; default 300)  --no-write (print only)
// --save-baseline (also keep the numbers in bench/baseline.json, shown as "before" in later
// documents)  --skip-process  --skip-sweep  --plan-format yaml|json (json: the same plans written as
// JSON, for when the loader reads JSON faster than YAML)  --from-last (no runs: write the document
// again from bench/out/last-run.json, which every run keeps)
import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { cpus, loadavg, totalmem } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { generate } from "./gen.mjs";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const OUT = join(ROOT, "bench/out");
const CLI = join(ROOT, "dist/cli/main.js");
const args = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? args[i + 1] : dflt;
};
const flag = (name) => args.includes(`--${name}`);
const SIZES = String(opt("sizes", "1000,5000,20000")).split(",").map(Number);
const RUNS = Number(opt("runs", "3"));
// one run for the largest size by default: a run there takes minutes while the plan loader is slow
const LARGE_RUNS = Number(opt("large-runs", "1"));
const SEED = Number(opt("seed", "7"));
const runsFor = (n) => (n >= 20000 ? LARGE_RUNS : RUNS);
const TIMEOUT_S = Number(opt("timeout", "300"));
const PLAN_FORMAT = opt("plan-format", "yaml");
const PLAN_NAME = PLAN_FORMAT === "json" ? "plan.json" : "plan.yaml";
process.env.BENCH_PLAN = PLAN_NAME;
const log = (s) => process.stderr.write(s + "\n");

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

// ---------------------------------------------------------------- inputs
const genHash = createHash("sha256").update(readFileSync(join(ROOT, "bench/gen.mjs"))).digest("hex").slice(0, 16);
async function ensureData(n) {
  const dir = join(OUT, `r${n}`);
  const stamp = join(dir, "stamp");
  const want = `seed=${SEED} gen=${genHash}`;
  if (existsSync(stamp) && readFileSync(stamp, "utf8") === want && existsSync(join(dir, "table.csv"))) return dir;
  log(`generating r${n} (seed ${SEED})...`);
  await generate(n, SEED, dir);
  writeFileSync(stamp, want);
  return dir;
}

/** The plan as JSON beside the YAML (same data; the lock file is the same). */
async function ensureJsonPlan(dir) {
  const json = join(dir, "plan.json");
  if (existsSync(json) && statSync(json).mtimeMs >= statSync(join(dir, "plan.yaml")).mtimeMs) return;
  const { parse } = await import(join(ROOT, "node_modules/yaml/dist/index.js"));
  writeFileSync(json, JSON.stringify(parse(readFileSync(join(dir, "plan.yaml"), "utf8"), { maxAliasCount: -1 }), null, 1) + "\n");
}

// ---------------------------------------------------------------- library stages
const STAGES = [
  ["load", "load + validate the plan"],
  ["lock", "read the lock"],
  ["allocate", "allocate (against the lock)"],
  ["emit-csv", "emit CSV"],
  ["emit-json", "emit JSON"],
  ["lint-plan", "lint the plan's allocation"],
  ["lint-table", "lint the CSV table (read + rules)"],
  ["decode", "decode 10,000 addresses"],
];
function runStage(stage, dir, runs) {
  const r = spawnSync(process.execPath, ["--expose-gc", "--max-old-space-size=8192", join(ROOT, "bench/stage.mjs"), stage, dir, String(runs)], { encoding: "utf8", maxBuffer: 1 << 26, timeout: TIMEOUT_S * 1000, killSignal: "SIGKILL" });
  if (r.error?.code === "ETIMEDOUT" || r.signal === "SIGKILL") return { stage, timedOut: true, ms: [TIMEOUT_S * 1000], cpuMs: [NaN], sids: NaN, maxRssKb: NaN };
  if (r.status !== 0) throw new Error(`stage ${stage} failed:\n${r.stderr}`);
  return JSON.parse(r.stdout.trim().split("\n").pop());
}

// ---------------------------------------------------------------- whole processes
const HAVE_TIME = existsSync("/usr/bin/time");
const HAVE_TIMEOUT = existsSync("/usr/bin/timeout");
function runProcess(cliArgs, { stdout = "ignore" } = {}) {
  // `timeout` (when present) kills a run that takes too long; /usr/bin/time then still reports it
  const node = HAVE_TIMEOUT ? ["/usr/bin/timeout", "-s", "KILL", String(TIMEOUT_S), process.execPath] : [process.execPath];
  const argv = HAVE_TIME ? ["/usr/bin/time", ["-v", ...node, CLI, ...cliArgs]] : [process.execPath, [join(ROOT, "bench/with-rss.mjs"), ...cliArgs]];
  const t0 = performance.now();
  const r = spawnSync(argv[0], argv[1], { encoding: "utf8", stdio: ["ignore", stdout, "pipe"], maxBuffer: 1 << 28, timeout: (TIMEOUT_S + 30) * 1000, killSignal: "SIGKILL" });
  const ms = performance.now() - t0;
  if (r.error?.code === "ETIMEDOUT" || /Command terminated by signal 9|exited 137/.test(r.stderr ?? "") || r.status === 137) return { ms: TIMEOUT_S * 1000, cpuMs: NaN, rssKb: NaN, status: -1, timedOut: true };
  const m = HAVE_TIME ? /Maximum resident set size \(kbytes\): (\d+)/.exec(r.stderr) : /maxrss-kb (\d+)/.exec(r.stderr);
  if (r.status !== 0 && r.status !== 1) throw new Error(`sidcarve ${cliArgs.slice(0, 2).join(" ")} exited ${r.status}:\n${r.stderr.slice(0, 2000)}`);
  const user = /User time \(seconds\): ([\d.]+)/.exec(r.stderr);
  const sys = /System time \(seconds\): ([\d.]+)/.exec(r.stderr);
  const cpuMs = user && sys ? (Number(user[1]) + Number(sys[1])) * 1000 : NaN;
  return { ms, cpuMs, rssKb: m ? Number(m[1]) : NaN, status: r.status };
}
function decodeArgs(dir) {
  // 10,000 SID addresses from the clean table, evenly spread
  const rows = readFileSync(join(dir, `bench-r${dir.match(/r(\d+)$/)[1]}.sids.csv`), "utf8").split("\r\n").slice(2, -1);
  const step = Math.max(1, Math.floor(rows.length / 10000));
  const out = [];
  for (let i = 0; out.length < 10000; i = (i + step) % rows.length) out.push(rows[i].split(",")[3]);
  return out;
}
function processes(dir, runs) {
  const tmp = join(dir, "tmp");
  rmSync(tmp, { recursive: true, force: true });
  mkdirSync(tmp, { recursive: true });
  const plan = join(dir, PLAN_NAME);
  const cmds = [
    ["allocate", ["allocate", plan, "--dry-run"]],
    ["emit-csv", ["emit", plan, "--format", "csv", "--out", tmp, "--force"]],
    ["emit-json", ["emit", plan, "--format", "json", "--out", tmp, "--force"]],
    ["lint-plan", ["lint", plan, "--format", "json", "--report", join(tmp, "lint-plan.json")]],
    ["lint-table", ["lint", join(dir, "table.csv"), "--format", "json", "--report", join(tmp, "lint-table.json")]],
    ["decode", ["decode", ...decodeArgs(dir), "--plan", plan, "--format", "json"]],
  ];
  const res = {};
  for (const [name, a] of cmds) {
    const rs = [];
    for (let i = 0; i < runs; i++) {
      rs.push(runProcess(a));
      if (rs[rs.length - 1].timedOut) break;
    }
    res[name] = { ms: median(rs.map((r) => r.ms)), cpuMs: median(rs.map((r) => r.cpuMs)), rssKb: Math.max(...rs.map((r) => r.rssKb)), all: rs.map((r) => Math.round(r.ms)), timedOut: rs.some((r) => r.timedOut) };
    log(`  process ${name}: ${(res[name].ms / 1000).toFixed(2)} s, ${(res[name].rssKb / 1024).toFixed(0)} MB`);
  }
  // did lint find every planted defect?
  if (!existsSync(join(tmp, "lint-table.json")) || !existsSync(join(tmp, "lint-plan.json"))) {
    res.defects = [];
    rmSync(tmp, { recursive: true, force: true });
    return res;
  }
  const report = JSON.parse(readFileSync(join(tmp, "lint-table.json"), "utf8"));
  const defects = JSON.parse(readFileSync(join(dir, "defects.json"), "utf8"));
  const found = defects.map((d) => {
    const hits = report.findings.filter((f) => f.objects.includes(d.marker) || Object.values(f.data ?? {}).includes(d.marker));
    return { ...d, foundBy: [...new Set(hits.map((f) => f.rule))] };
  });
  res.defects = found;
  res.tableFindings = report.counts;
  const planReport = JSON.parse(readFileSync(join(tmp, "lint-plan.json"), "utf8"));
  res.planFindings = planReport.counts;
  rmSync(tmp, { recursive: true, force: true });
  return res;
}

// ---------------------------------------------------------------- sweeps
function prefixesOf(dir) {
  const file = join(dir, "prefixes.txt");
  if (!existsSync(file) || statSync(file).mtimeMs < statSync(join(dir, "table.csv")).mtimeMs) {
    const r = spawnSync(process.execPath, ["--max-old-space-size=8192", join(ROOT, "bench/sweep.mjs"), "extract", join(dir, "table.csv"), file], { encoding: "utf8" });
    if (r.status !== 0) throw new Error(r.stderr);
  }
  return file;
}
function sweep(cmd, argv) {
  const t0 = performance.now();
  const r = spawnSync(cmd, argv, { encoding: "utf8", maxBuffer: 1 << 24 });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`${cmd} ${argv.join(" ")}: ${r.stderr}`);
  return { ...JSON.parse(r.stdout.trim()), processMs: ms };
}
function sweeps(dir, n, runs) {
  const file = prefixesOf(dir);
  const res = {};
  const pyRuns = n >= 20000 ? 1 : Math.min(runs, 3);
  const py = [];
  for (let i = 0; i < pyRuns; i++) py.push(sweep("python3", ["-I", join(ROOT, "bench/sweep.py"), file]));
  res.python = { ...py[0], total_s: median(py.map((p) => p.total_s)) };
  for (const mode of ["packed", "bigint"]) {
    const rs = [];
    for (let i = 0; i < runs; i++) rs.push(sweep(process.execPath, ["--max-old-space-size=8192", join(ROOT, "bench/sweep.mjs"), mode, file]));
    res[mode] = { ...rs[0], total_s: median(rs.map((p) => p.total_s)) };
  }
  if (n === Math.min(...SIZES)) res.naive = sweep(process.execPath, [join(ROOT, "bench/sweep.mjs"), "naive", file]);
  const counts = Object.entries(res).map(([k, v]) => `${k}=${v.overlaps}/${v.outside}`);
  res.agree = new Set(Object.values(res).map((v) => `${v.overlaps}/${v.outside}`)).size === 1;
  log(`  sweeps ${res.agree ? "agree" : "DISAGREE"}: ${counts.join(" ")}`);
  return res;
}

// ---------------------------------------------------------------- run
const machine = {
  cpu: cpus()[0]?.model ?? "unknown",
  cores: cpus().length,
  memoryGb: Math.round(totalmem() / 2 ** 30),
  node: process.version,
  python: spawnSync("python3", ["--version"], { encoding: "utf8" }).stdout.trim() || "absent",
  load: loadavg().map((x) => x.toFixed(1)).join(", "),
  // how fast the machine is right now (bench/probe.mjs), in a child of its own
  probe: (() => {
    try {
      return JSON.parse(spawnSync(process.execPath, [join(ROOT, "bench", "probe.mjs")], { encoding: "utf8" }).stdout);
    } catch {
      return undefined;
    }
  })(),
};
log(`machine: ${machine.cpu}, ${machine.cores} cores, ${machine.memoryGb} GB, node ${machine.node}, ${machine.python}`);

const FROM_LAST = flag("from-last");
const results = [];
for (const n of FROM_LAST ? [] : SIZES) {
  const dir = await ensureData(n);
  if (PLAN_FORMAT === "json") await ensureJsonPlan(dir);
  const runs = runsFor(n);
  log(`r${n}: ${runs} runs`);
  const stages = {};
  for (const [s] of STAGES) {
    stages[s] = runStage(s, dir, runs);
    log(`  stage ${s}: ${(median(stages[s].ms) / 1000).toFixed(3)} s, ${(stages[s].maxRssKb / 1024).toFixed(0)} MB peak`);
  }
  const proc = flag("skip-process") ? undefined : processes(dir, runs);
  const sw = flag("skip-sweep") ? undefined : sweeps(dir, n, runs);
  results.push({ routers: n, sids: stages.allocate.sids, tableSids: stages["lint-table"].sids, stages, processes: proc, sweeps: sw });
}

const summary = FROM_LAST
  ? JSON.parse(readFileSync(join(OUT, "last-run.json"), "utf8"))
  : { machine, runs: RUNS, largeRuns: LARGE_RUNS, seed: SEED, timeoutS: TIMEOUT_S, planFormat: PLAN_FORMAT, results };
if (!FROM_LAST) {
  mkdirSync(OUT, { recursive: true });
  writeFileSync(join(OUT, "last-run.json"), JSON.stringify(summary, null, 2) + "\n");
}
for (const r of summary.results) {
  const d = r.processes?.defects ?? [];
  const miss = d.filter((x) => x.foundBy.length === 0);
  if (d.length) log(`r${r.routers}: ${d.length - miss.length} of ${d.length} planted defects found${miss.length ? ` (not found: ${miss.map((x) => x.kind).join("; ")})` : ""}`);
}
if (flag("save-baseline")) writeFileSync(join(ROOT, "bench/baseline.json"), JSON.stringify(summary, null, 2) + "\n");
const baseline = existsSync(join(ROOT, "bench/baseline.json")) ? JSON.parse(readFileSync(join(ROOT, "bench/baseline.json"), "utf8")) : undefined;
const doc = renderDoc(summary, flag("save-baseline") ? undefined : baseline);
process.stdout.write(doc);
if (!flag("no-write")) {
  mkdirSync(join(ROOT, "docs"), { recursive: true });
  writeFileSync(join(ROOT, "docs/benchmarks.md"), doc);
  log("wrote docs/benchmarks.md");
}

// ---------------------------------------------------------------- the document
function renderDoc(s, before) {
  const sec = (ms) => (ms === undefined || Number.isNaN(ms) ? "–" : ms >= 10000 ? `${(ms / 1000).toFixed(1)} s` : `${(ms / 1000).toFixed(2)} s`);
  // a run that was stopped has no peak memory (NaN, or null once saved as JSON)
  const mb = (kb) => (kb === undefined || kb === null || Number.isNaN(kb) ? "–" : `${Math.round(kb / 1024)} MB`);
  const rate = (n, ms) => (ms && Number.isFinite(n) ? `${Math.round(n / (ms / 1000)).toLocaleString("en-US")}` : "–");
  const num = (n) => (Number.isFinite(n) ? n.toLocaleString("en-US") : "–");
  const beforeOf = (routers) => before?.results.find((r) => r.routers === routers);
  const wallCpu = (p) => (p.timedOut ? `> ${sec(p.ms)} (stopped)` : `${sec(p.ms)} (CPU ${sec(p.cpuMs)})`);
  const stageTime = (st) => (st.timedOut ? `> ${sec(median(st.ms))} (stopped)` : `${sec(median(st.ms))} (CPU ${sec(median(st.cpuMs ?? [NaN]))})`);
  const first = s.results[0];
  const last = s.results[s.results.length - 1];
  /** growth per 10× SIDs between the smallest and the largest size, from CPU time when known */
  const growth = (get, sidsOf) => {
    if (first === last) return NaN;
    const a = get(first);
    const b = get(last);
    if (!Number.isFinite(a) || !Number.isFinite(b) || a <= 0) return NaN;
    const e = Math.log(b / a) / Math.log(sidsOf(last) / sidsOf(first));
    return Math.pow(10, e);
  };
  const stageCpu = (r, k) => (r.stages[k].timedOut ? NaN : median(r.stages[k].cpuMs ?? r.stages[k].ms));
  const L = [];
  L.push("# Benchmarks", "");
  L.push("Written by `npm run bench` (bench/run.mjs); numbers change from run to run and machine to machine, and no");
  L.push("test asserts a timing. The inputs are synthetic plans from `bench/gen.mjs` (seed " + s.seed + "): invented regions of");
  L.push("sites with 25 routers each (2 P, 1 route reflector, 22 PEs), algorithm 0 and Flex-Algo 128, End and End.X");
  L.push("(protection both) per algorithm, 18 VRFs per PE, per-CE cross-connects, wires, VLAN wires and bridge domains:");
  L.push("about 50 SIDs per router. Each SID table is emitted by sidcarve from the allocated plan; six defects are then");
  L.push("planted in it (see `defects.json` beside each table).", "");
  L.push("Times are wall clock with the CPU time (user + system, all threads) beside it: on a shared machine the wall");
  L.push("time also counts waiting for a core, the CPU time much less so.", "");
  if (before) {
    const same = before.machine.cpu === s.machine.cpu;
    L.push(`"Before" numbers come from \`bench/baseline.json\`: the same benchmark run ${same ? "on the same machine" : `on another machine (${before.machine.cpu}, ${before.machine.cores} cores)`} with the code as it`);
    L.push(`stood before the fast paths (median of ${before.runs} run${before.runs === 1 ? "" : "s"}; load average ${before.machine.load ?? "unknown"} at its start, so its wall times`);
    L.push("carry more waiting than the CPU times do). Rules changed between the two runs as well.");
    if (!same) L.push("The two machines differ in speed: compare the ratios measured within one run (the Python sweep below), not the \"before\" times with these.");
    L.push("");
  }
  L.push("## Machine", "");
  L.push(`- CPU: ${s.machine.cpu}, ${s.machine.cores} cores`, `- memory: ${s.machine.memoryGb} GB`, `- Node.js ${s.machine.node}; ${s.machine.python}`);
  if (s.machine.load) L.push(`- load average when the run started: ${s.machine.load}`);
  if (s.machine.probe) L.push(`- speed when the run started (bench/probe.mjs): ${s.machine.probe.aluMs} ms for 10^8 steps of an integer loop; ${s.machine.probe.readNs} ns per dependent random read over 256 MB (memory latency: on a shared machine it varies most from day to day, and the allocator, the loaders and the GC feel it most)`);
  L.push(`- plans read as ${s.planFormat === "json" ? "JSON (plan.json)" : "YAML (plan.yaml)"}`);
  L.push(`- runs: median of ${s.runs} (${s.largeRuns} for 20,000 routers); peak memory is the largest of the runs; a child is stopped after ${s.timeoutS ?? 600} s`, "");
  L.push("## Whole processes (the CLI)", "");
  L.push("From spawn to exit; peak resident memory from `/usr/bin/time -v`.", "");
  const cmds = [
    ["allocate", "`allocate --dry-run` (load, lock, allocate, summary)"],
    ["emit-csv", "`emit --format csv --out` (load, lock, allocate, write CSV)"],
    ["emit-json", "`emit --format json --out`"],
    ["lint-plan", "`lint PLAN --format json`"],
    ["lint-table", "`lint TABLE.csv --format json` (no plan)"],
    ["decode", "`decode` of 10,000 addresses"],
  ];
  L.push("| command | " + s.results.map((r) => `${num(r.routers)} routers (${num(r.sids)} SIDs)`).join(" | ") + " |");
  L.push("| --- | " + s.results.map(() => "---").join(" | ") + " |");
  for (const [k, label] of cmds) {
    L.push(
      `| ${label} | ` +
        s.results
          .map((r) => {
            const p = r.processes?.[k];
            if (!p) return "–";
            const b = beforeOf(r.routers)?.processes?.[k];
            return `${wallCpu(p)}, ${mb(p.rssKb)}` + (b ? `; before: ${wallCpu(b)}, ${mb(b.rssKb)}` : "");
          })
          .join(" | ") +
        " |",
    );
  }
  L.push("");
  L.push("## Stages (the library, one child process per stage)", "");
  L.push("The stage alone (what it needs first is done outside the timing), SIDs per second of wall time, and the child's");
  L.push("peak resident memory (which includes the inputs the stage needs).", "");
  L.push("| stage | " + s.results.map((r) => `${num(r.routers)} routers`).join(" | ") + " | growth per 10× SIDs (CPU) |");
  L.push("| --- | " + s.results.map(() => "---").join(" | ") + " | --- |");
  const sidsOfStage = (k) => (r) => (k === "lint-table" ? r.tableSids : r.sids);
  for (const [k, label] of STAGES) {
    const cells = s.results.map((r) => {
      const st = r.stages[k];
      const b = beforeOf(r.routers)?.stages?.[k];
      return `${stageTime(st)} · ${st.timedOut ? "–" : rate(sidsOfStage(k)(r), median(st.ms))}/s · ${mb(st.maxRssKb)}` + (b ? `; before: ${stageTime(b)}` : "");
    });
    const g = growth((r) => stageCpu(r, k), sidsOfStage(k));
    L.push(`| ${label} | ${cells.join(" | ")} | ${Number.isFinite(g) ? `${g.toFixed(1)}×` : "–"} |`);
  }
  L.push("");
  L.push("Growth is 10^e, with e fitted between the smallest and the largest size (CPU time ∝ SIDs^e); the target is at");
  L.push("most 13× per 10× SIDs.", "");
  const withRules = s.results.filter((r) => r.stages["lint-table"].extra?.rules && Object.keys(r.stages["lint-table"].extra.rules).length > 0);
  if (withRules.length > 0) {
    const r = withRules[withRules.length - 1];
    L.push(`## Lint time per rule (${num(r.tableSids)}-SID table, library, wall time)`, "");
    L.push("From the engine's optional per-rule timing (`onRuleTimed`, used only by the benchmark). \"(views)\" is the");
    L.push("one-off cost of the shared views, paid by the first rule that asks for them (`ctx.packed`, `ctx.sids`,");
    L.push("`ctx.locators`).", "");
    const ex = r.stages["lint-table"].extra;
    L.push(`Reading the table: ${sec(median(ex.readMs))}; views and rules: ${sec(median(ex.lintMs))}.`, "");
    L.push("| rule | time |", "| --- | --- |");
    for (const [id, t] of Object.entries(ex.rules).sort((a, b) => b[1] - a[1])) L.push(`| ${id} | ${sec(t)} |`);
    L.push("");
  }
  L.push("## Memory per SID held", "");
  L.push("Heap and array-buffer bytes still reachable after the stage (after a forced GC), divided by the SIDs.", "");
  L.push("| what | " + s.results.map((r) => `${num(r.routers)} routers`).join(" | ") + " |");
  L.push("| --- | " + s.results.map(() => "---").join(" | ") + " |");
  const per = (bytes, n) => (Number.isFinite(bytes) && n ? `${Math.round(bytes / n)} B` : "–");
  L.push("| the allocation (plan, lock and table) | " + s.results.map((r) => per(r.stages.allocate.heldBytes, r.sids)).join(" | ") + " |");
  L.push("| the SID table read for linting | " + s.results.map((r) => per(r.stages["lint-table"].heldBytes, r.tableSids)).join(" | ") + " |");
  L.push("| peak RSS of `lint TABLE.csv` / SIDs | " + s.results.map((r) => (r.processes?.["lint-table"] ? per(r.processes["lint-table"].rssKb * 1024, r.tableSids) : "–")).join(" | ") + " |");
  L.push("");
  if (s.results.some((r) => r.processes?.defects?.length)) {
    L.push("## Planted defects", "");
    L.push("Each table carries six planted defects; a defect counts as found when a finding of `lint TABLE.csv` quotes its");
    L.push("address or prefix among its objects.", "");
    L.push("| routers | found | by | not found | findings (error / warning / info) |", "| --- | --- | --- | --- | --- |");
    for (const r of s.results) {
      const d = r.processes?.defects;
      if (!d?.length) continue;
      const miss = d.filter((x) => x.foundBy.length === 0);
      const c = r.processes.tableFindings;
      const by = d.filter((x) => x.foundBy.length > 0).map((x) => `${x.kind}: ${x.foundBy.join(", ")}`).join("; ");
      L.push(`| ${num(r.routers)} | ${d.length - miss.length} of ${d.length} | ${by || "–"} | ${miss.map((x) => `${x.kind} (wants ${x.expect})`).join("; ") || "–"} | ${c ? `${c.error} / ${c.warning} / ${c.info}` : "–"} |`);
    }
    L.push("");
  }
  if (s.results.some((r) => r.sweeps)) {
    L.push("## The same sort-and-sweep job elsewhere", "");
    L.push("Locators and SIDs (as /128) of each table, one per line (`bench/out/rN/prefixes.txt`); sort by first address");
    L.push("then length, sweep once with a stack of open locators; count locator pairs of different owners that nest, and");
    L.push("SIDs outside every locator of their owner. Times are parse + sort + sweep inside the program (reading the");
    L.push("file excluded): `bench/sweep.py` (Python 3 `ipaddress`), and `bench/sweep.mjs` with packed typed arrays and");
    L.push("the radix index sort of `src/sid/packed.ts`, with `Prefix` objects and bigints, and naive O(n²) (smallest size).");
    L.push("The last columns set them against the whole `lint TABLE.csv` process, which does far more (reads and checks every");
    L.push("column, runs every rule, writes the report).", "");
    L.push("| routers | prefixes | Python ipaddress | TS bigint | TS packed | TS naive O(n²) | counts agree | `lint TABLE.csv` | Python ÷ lint | Python ÷ packed |");
    L.push("| --- | --- | --- | --- | --- | --- | --- | --- | --- | --- |");
    for (const r of s.results) {
      const w = r.sweeps;
      if (!w) continue;
      const lint = r.processes?.["lint-table"];
      const lintMs = lint && !lint.timedOut ? lint.ms : NaN;
      L.push(
        `| ${num(r.routers)} | ${num(w.python.items)} | ${sec(w.python.total_s * 1000)} | ${sec(w.bigint.total_s * 1000)} | ${sec(w.packed.total_s * 1000)} | ${w.naive ? sec(w.naive.total_s * 1000) : "–"} | ${w.agree ? `yes (${num(w.python.overlaps)} pairs, ${num(w.python.outside)} outside)` : "**no**"} | ${sec(lintMs)} | ${Number.isFinite(lintMs) ? `${((w.python.total_s * 1000) / lintMs).toFixed(1)}×` : "–"} | ${(w.python.total_s / w.packed.total_s).toFixed(1)}× |`,
      );
    }
    const small = s.results.find((r) => r.sweeps?.naive);
    if (small) L.push("", `On the smallest size the naive O(n²) reference takes ${(small.sweeps.naive.total_s / small.sweeps.packed.total_s).toFixed(0)}× as long as the packed sweep and ${(small.sweeps.naive.total_s / small.sweeps.python.total_s).toFixed(1)}× as long as Python's sort-and-sweep.`);
    L.push("");
  }
  {
    // where a whole emit process spends its time, from the library stages of the same size
    const r = s.results.find((x) => x.routers === 20000) ?? last;
    const p = r.processes?.["emit-csv"];
    const part = (k) => stageCpu(r, k);
    const parts = [["load + validate", part("load")], ["lock", part("lock")], ["allocate", part("allocate")], ["emit CSV", part("emit-csv")]];
    if (p && !p.timedOut && parts.every(([, v]) => Number.isFinite(v))) {
      const sum = parts.reduce((acc, [, v]) => acc + v, 0);
      L.push(`## Where an \`emit\` process spends its time (${num(r.routers)} routers, CPU)`, "");
      L.push(`The process took ${sec(p.cpuMs)} of CPU; its library stages alone: ` + parts.map(([k, v]) => `${k} ${sec(v)} (${Math.round((100 * v) / sum)} %)`).join(", ") + ". The rest is start-up, the lock check and writing the file.", "");
    }
  }
  L.push("## Targets", "");
  const big = s.results.find((r) => r.routers === 20000) ?? last;
  const lintP = big.processes?.["lint-table"];
  const py = big.sweeps?.python;
  const emitP = big.processes?.["emit-csv"];
  const grow = STAGES.map(([k]) => growth((r) => stageCpu(r, k), sidsOfStage(k)));
  const worst = Math.max(...grow.filter(Number.isFinite));
  const held = Math.max(big.stages["lint-table"].heldBytes / big.tableSids, big.stages.allocate.heldBytes / big.sids);
  const yes = (b) => (b ? "met" : "**not met**");
  L.push("| target | measured | |", "| --- | --- | --- |");
  if (lintP) {
    L.push(`| lint of the ${num(big.tableSids)}-SID CSV table as a process ≤ 3 s | ${wallCpu(lintP)} | ${yes(!lintP.timedOut && lintP.ms <= 3000)} |`);
    L.push(`| … peak RSS ≤ 768 MB | ${mb(lintP.rssKb)} | ${yes(lintP.rssKb <= 768 * 1024)} |`);
    if (py) L.push(`| … ≥ 7× faster than the Python ipaddress sort-and-sweep | ${lintP.timedOut ? "–" : `${((py.total_s * 1000) / lintP.ms).toFixed(1)}×`} | ${yes(!lintP.timedOut && (py.total_s * 1000) / lintP.ms >= 7)} |`);
  }
  if (emitP) L.push(`| allocate + emit CSV, ${num(big.routers)} routers, as the \`emit\` process (load, lock, allocate, write) ≤ 4 s | ${wallCpu(emitP)} | ${yes(!emitP.timedOut && emitP.ms <= 4000)} |`);
  const libMs = median(big.stages.allocate.ms) + median(big.stages["emit-csv"].ms);
  L.push(`| … the two library stages alone (allocate + emit CSV) | ${sec(libMs)} (CPU ${sec(stageCpu(big, "allocate") + stageCpu(big, "emit-csv"))}) | ${yes(libMs <= 4000)} |`);
  if (first !== last) L.push(`| growth ≤ 13× per 10× SIDs, every stage | worst ${worst.toFixed(1)}× (${STAGES[grow.indexOf(worst)]?.[0] ?? "?"}) | ${yes(worst <= 13)} |`);
  L.push(`| ≤ 768 bytes per SID held | ${Math.round(held)} B | ${yes(held <= 768)} |`);
  L.push("");
  return L.join("\n") + "\n";
}
