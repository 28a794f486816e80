// One benchmark stage, run in a child process so that its peak memory is its own:
//   node --expose-gc bench/stage.mjs STAGE DIR RUNS
// Prints one JSON line: { stage, sids, ms: [...], maxRssKb, heldBytes, extra }.
// Stages call the library in dist/ (run `npm run build` first); the work a stage needs before it
// (reading the plan, allocating) is done once, outside the timed part.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const dist = (p) => import(join(ROOT, "dist", p));

const [stage, dir, runsText] = process.argv.slice(2);
const runs = Number(runsText ?? 3);
const TODAY = "2026-06-01";

const { loadPlanBytes } = await dist("plan/load.js");
const { parseLock } = await dist("alloc/lock.js");
const { allocate } = await dist("alloc/allocate.js");
// the CLI writes CSV files with csvPackedChunks (from the allocation's columns) where the build
// has it, else csvByteChunks, else csvChunks (older builds)
const { csvChunks, csvByteChunks, csvPackedChunks } = await dist("emit/csv.js");
const { jsonChunks } = await dist("emit/json.js");
const engine = await dist("lint/engine.js");
const { inputFromAllocation, inputFromTable } = await dist("lint/input.js");
const { ALL_RULES } = await dist("lint/rules/index.js");
const tableRead = await dist("sid/table-read.js");
const { Decoder } = await dist("alloc/decode.js");
const text = await dist("net/text.js");
/** The packed reader, when this build has it (older builds only have readCsvTable). */
const packed = await dist("sid/packed.js").catch(() => undefined);

// BENCH_PLAN picks the plan's file: plan.yaml (default) or plan.json (the same plan as JSON)
const planFile = join(dir, process.env.BENCH_PLAN ?? "plan.yaml");
const lockFile = join(dir, "plan.lock.json");
const tableFile = join(dir, "table.csv");

const now = () => performance.now();
const gc = () => globalThis.gc?.();
const heap = () => {
  gc();
  const m = process.memoryUsage();
  return m.heapUsed + m.arrayBuffers;
};

function loadPlan() {
  const r = loadPlanBytes(readFileSync(planFile), planFile);
  if (!r.ok) throw new Error(`plan did not load: ${r.diagnostics.length} problems`);
  return r.plan;
}
function loadLockFor(plan) {
  const r = parseLock(readFileSync(lockFile), lockFile, plan.name);
  if (!r.ok) throw new Error("lock did not load");
  return r.lock;
}
function allocated(plan, lock) {
  const r = allocate(plan, lock);
  if (!r.ok) throw new Error("allocation failed");
  return r.allocation;
}
/** SIDs of an allocation: its packed count where the build has one (asking for `table` would make every SID object). */
const sidCount = (a) => a.packed?.count ?? a.table.nodes.reduce((s, n) => s + n.sids.length, 0);

/** CPU time of this process (user + system) in ms: less disturbed than wall time on a busy machine. */
const cpuMs = () => {
  const c = process.cpuUsage();
  return (c.user + c.system) / 1000;
};
const cpu = [];

/** Time `fn` `runs` times; returns the wall times and the last result (CPU times go to `cpu`). */
function timed(fn) {
  const ms = [];
  let last;
  for (let i = 0; i < runs; i++) {
    last = undefined;
    gc();
    const t0 = now();
    const c0 = cpuMs();
    last = fn();
    ms.push(now() - t0);
    cpu.push(cpuMs() - c0);
  }
  return { ms, last };
}

/** Read the CSV table the fastest way this build offers; the lint input that goes with it. */
function readTable(bytes) {
  if (packed?.readCsvPacked && engine.inputFromPacked) {
    const p = packed.readCsvPacked(bytes);
    return { sids: p.table.count, input: () => engine.inputFromPacked(p, tableFile, TODAY), keep: p };
  }
  const r = tableRead.readCsvTable(new TextDecoder().decode(bytes));
  return { sids: r.table.nodes.reduce((s, n) => s + n.sids.length, 0), input: () => inputFromTable(r, tableFile, TODAY), keep: r };
}

let out;
switch (stage) {
  case "load": {
    const bytes = readFileSync(planFile);
    const h0 = heap();
    const { ms, last } = timed(() => {
      const r = loadPlanBytes(bytes, planFile);
      if (!r.ok) throw new Error("plan did not load");
      return r.plan;
    });
    const held = heap() - h0;
    const lock = loadLockFor(last);
    out = { ms, sids: sidCount(allocated(last, lock)), heldBytes: held };
    break;
  }
  case "lock": {
    const plan = loadPlan();
    // the CLI reads the lock as bytes (parseLock takes text or bytes)
    const t = readFileSync(lockFile);
    const { ms, last } = timed(() => parseLock(t, lockFile, plan.name));
    out = { ms, sids: sidCount(allocated(plan, last.lock)) };
    break;
  }
  case "allocate": {
    const plan = loadPlan();
    const lock = loadLockFor(plan);
    const h0 = heap();
    let a;
    const { ms } = timed(() => {
      a = undefined;
      a = allocated(plan, lock);
      return a;
    });
    out = { ms, sids: sidCount(a), heldBytes: heap() - h0 };
    break;
  }
  case "emit-csv":
  case "emit-json": {
    const plan = loadPlan();
    const a = allocated(plan, loadLockFor(plan));
    const { ms, last } = timed(() => {
      let bytes = 0;
      const chunks =
        stage === "emit-json"
          ? // as the CLI writes JSON files: SID objects made a node at a time where the build can
            a.packed?.freshNode
            ? jsonChunks(a.packed, (function* () { for (const id of a.packed.nodeIdsByName()) yield a.packed.freshNode(id); })())
            : jsonChunks(a.table, a.table.nodes)
          : csvPackedChunks && a.packed
            ? csvPackedChunks(a.packed, a.packed.nodeIdsByName())
            : (csvByteChunks ?? csvChunks)(a.table.plan, a.table.nodes);
      for (const c of chunks) bytes += c.length;
      return bytes;
    });
    out = { ms, sids: sidCount(a), extra: { chars: last } };
    break;
  }
  case "lint-plan": {
    const plan = loadPlan();
    const a = allocated(plan, loadLockFor(plan));
    const profile = new Map();
    const { ms, last } = timed(() => engine.runLint(inputFromAllocation(a, TODAY), ALL_RULES, { onRuleTimed: (id, t) => profile.set(id, (profile.get(id) ?? 0) + t) }));
    for (const [k, v] of profile) profile.set(k, v / runs);
    out = { ms, sids: sidCount(a), extra: { findings: last.findings.length, counts: last.counts, rules: Object.fromEntries(profile) } };
    break;
  }
  case "lint-table": {
    const bytes = readFileSync(tableFile);
    const h0 = heap();
    const readMs = [];
    const lintMs = [];
    const profile = new Map();
    let sids = 0;
    let result;
    let held = 0;
    const { ms } = timed(() => {
      result = undefined;
      const t0 = now();
      const r = readTable(bytes);
      readMs.push(now() - t0);
      if (held === 0) held = heap() - h0;
      sids = r.sids;
      const t1 = now();
      result = engine.runLint(r.input(), ALL_RULES, { onRuleTimed: (id, t) => profile.set(id, (profile.get(id) ?? 0) + t) });
      lintMs.push(now() - t1);
      return result;
    });
    for (const [k, v] of profile) profile.set(k, v / runs);
    out = { ms, sids, heldBytes: held, extra: { readMs, lintMs, findings: result.findings.length, counts: result.counts, rules: Object.fromEntries(profile) } };
    break;
  }
  case "decode": {
    const plan = loadPlan();
    const a = allocated(plan, loadLockFor(plan));
    // 10,000 addresses spread over the table: every k-th SID, plus a few with an argument set
    const all = a.table.nodes.flatMap((n) => n.sids);
    const step = Math.max(1, Math.floor(all.length / 10000));
    const addrs = [];
    for (let i = 0; addrs.length < 10000; i = (i + step) % all.length) addrs.push(text.formatAddr(all[i].sid | (addrs.length % 10 === 0 ? 7n : 0n)));
    const { ms, last } = timed(() => {
      const d = new Decoder(a);
      let hits = 0;
      for (const s of addrs) {
        const p = text.parseAddr(s);
        if (p.ok && d.decode(p.value).sid) hits++;
      }
      return hits;
    });
    out = { ms, sids: all.length, extra: { addresses: addrs.length, hits: last } };
    break;
  }
  default:
    throw new Error(`unknown stage ${stage}`);
}
process.stdout.write(JSON.stringify({ stage, ...out, cpuMs: cpu, maxRssKb: process.resourceUsage().maxRSS }) + "\n");
