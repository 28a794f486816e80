// The overlap/containment job of the benchmark in TypeScript (compiled, from dist/), three ways:
//   packed  four Uint32Array words per prefix, a radix index sort, one sweep (the fast path)
//   bigint  Prefix objects with bigint addresses, a comparator sort, one sweep (the readable way)
//   naive   every pair compared, O(n^2) (the obviously correct reference; smallest size only)
// Same job and output as bench/sweep.py: count pairs of locators of different owners where one
// contains the other, and SIDs in no locator of their own owner.
//   node bench/sweep.mjs MODE PREFIXES.txt        -> one JSON line with the counts and seconds
//   node bench/sweep.mjs extract TABLE.csv OUT.txt -> writes the prefixes of a CSV table
import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const dist = (p) => import(join(ROOT, "dist", p));
const [mode, file, outFile] = process.argv.slice(2);

if (mode === "extract") {
  // The prefixes of a table: each node's locators once, and each readable SID as a /128.
  const { readCsvTable } = await dist("sid/table-read.js");
  const { formatAddr } = await dist("net/text.js");
  const r = readCsvTable(readFileSync(file, "utf8"));
  const lines = [];
  for (const n of r.table.nodes) {
    for (const l of n.locators) lines.push(`${n.node} L ${l.prefix.format()}`);
    for (const s of n.sids) lines.push(`${n.node} S ${formatAddr(s.sid)}/128`);
  }
  writeFileSync(outFile, lines.join("\n") + "\n");
  process.exit(0);
}

const text = readFileSync(file, "utf8");
const lines = text.split("\n").filter((l) => l !== "");
const t0 = performance.now();
let result;
if (mode === "packed") result = await packedSweep(lines);
else if (mode === "bigint") result = await bigintSweep(lines);
else if (mode === "naive") result = await naiveSweep(lines);
else throw new Error(`unknown mode ${mode}`);
process.stdout.write(JSON.stringify({ mode, items: lines.length, ...result, total_s: (performance.now() - t0) / 1000 }) + "\n");

async function packedSweep(lines) {
  const { parseWordsInto } = await dist("net/text.js");
  const { radixSortIndex } = await dist("sid/packed.js");
  const n = lines.length;
  const w = [new Uint32Array(n), new Uint32Array(n), new Uint32Array(n), new Uint32Array(n)];
  const len = new Uint32Array(n);
  const owner = new Int32Array(n);
  const isSid = new Uint8Array(n);
  const owners = new Map();
  const tmp = new Uint32Array(4);
  const t0 = performance.now();
  for (let i = 0; i < n; i++) {
    const l = lines[i];
    const a = l.indexOf(" ");
    const name = l.slice(0, a);
    let id = owners.get(name);
    if (id === undefined) owners.set(name, (id = owners.size));
    owner[i] = id;
    isSid[i] = l.charCodeAt(a + 1) === 83 ? 1 : 0;
    const slash = l.lastIndexOf("/");
    if (!parseWordsInto(l.slice(a + 3, slash), tmp, 0)) throw new Error(`bad prefix in ${l}`);
    const pl = Number(l.slice(slash + 1));
    // keep the first address (masked) as the key
    for (let k = 0; k < 4; k++) {
      const bits = Math.min(32, Math.max(0, pl - 32 * k));
      w[k][i] = bits === 0 ? 0 : bits === 32 ? tmp[k] : (tmp[k] & ~((1 << (32 - bits)) - 1)) >>> 0;
    }
    len[i] = pl;
  }
  const t1 = performance.now();
  const order = radixSortIndex(n, [w[0], w[1], w[2], w[3], len]);
  const t2 = performance.now();
  // the sweep: a stack of open locators (their index); last address computed from words and length
  const stack = new Int32Array(256);
  let top = 0;
  let overlaps = 0;
  let outside = 0;
  const lastBelow = (j, i) => {
    // true when the last address of prefix j is below the first address of i
    const L = len[j];
    for (let k = 0; k < 4; k++) {
      const bits = Math.min(32, Math.max(0, L - 32 * k));
      const last = bits === 32 ? w[k][j] : (w[k][j] | (bits === 0 ? 0xffffffff : (1 << (32 - bits)) - 1)) >>> 0;
      const f = w[k][i];
      if (last !== f) return last < f;
    }
    return false;
  };
  for (let p = 0; p < n; p++) {
    const i = order[p];
    while (top > 0 && lastBelow(stack[top - 1], i)) top--;
    if (isSid[i]) {
      let inOwn = false;
      for (let s = 0; s < top; s++) if (owner[stack[s]] === owner[i]) inOwn = true;
      if (!inOwn) outside++;
    } else {
      for (let s = 0; s < top; s++) if (owner[stack[s]] !== owner[i]) overlaps++;
      stack[top++] = i;
    }
  }
  const t3 = performance.now();
  return { overlaps, outside, parse_s: (t1 - t0) / 1000, sort_s: (t2 - t1) / 1000, sweep_s: (t3 - t2) / 1000 };
}

async function parseAll(lines) {
  const { parsePrefix } = await dist("net/prefix.js");
  return lines.map((l) => {
    const [owner, kind, p] = l.split(" ");
    const r = parsePrefix(p);
    if (!r.ok) throw new Error(r.reason);
    return { owner, sid: kind === "S", prefix: r.value };
  });
}

async function bigintSweep(lines) {
  const { comparePrefixes } = await dist("net/prefix.js");
  const t0 = performance.now();
  const items = await parseAll(lines);
  const t1 = performance.now();
  items.sort((a, b) => comparePrefixes(a.prefix, b.prefix));
  const t2 = performance.now();
  const stack = [];
  let overlaps = 0;
  let outside = 0;
  for (const it of items) {
    const first = it.prefix.first;
    while (stack.length > 0 && stack[stack.length - 1].prefix.last < first) stack.pop();
    if (it.sid) {
      if (!stack.some((o) => o.owner === it.owner)) outside++;
    } else {
      for (const o of stack) if (o.owner !== it.owner) overlaps++;
      stack.push(it);
    }
  }
  const t3 = performance.now();
  return { overlaps, outside, parse_s: (t1 - t0) / 1000, sort_s: (t2 - t1) / 1000, sweep_s: (t3 - t2) / 1000 };
}

async function naiveSweep(lines) {
  const t0 = performance.now();
  const items = await parseAll(lines);
  const t1 = performance.now();
  const locs = items.filter((x) => !x.sid);
  let overlaps = 0;
  let outside = 0;
  for (let i = 0; i < locs.length; i++) {
    for (let j = i + 1; j < locs.length; j++) {
      const a = locs[i];
      const b = locs[j];
      if (a.owner !== b.owner && a.prefix.overlaps(b.prefix)) overlaps++;
    }
  }
  for (const s of items) {
    if (!s.sid) continue;
    if (!locs.some((l) => l.owner === s.owner && l.prefix.contains(s.prefix.addr))) outside++;
  }
  const t3 = performance.now();
  return { overlaps, outside, parse_s: (t1 - t0) / 1000, sort_s: 0, sweep_s: (t3 - t1) / 1000 };
}
