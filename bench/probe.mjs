// How fast this machine is right now, for comparing benchmark documents from different days:
// an integer loop (the CPU alone) and dependent random reads over 256 MB (memory latency, where a
// shared machine varies most). Prints one JSON line: { aluMs, readNs }.
//   node bench/probe.mjs
const STEPS = 1e8;
const READS = 4e6;

let x = 0;
let t = performance.now();
for (let i = 0; i < STEPS; i++) x = (Math.imul(x, 31) + i) | 0;
const aluMs = performance.now() - t;

// one random cycle through every slot (Sattolo's shuffle), so that each read's address depends
// on the one before and the walk never falls into a short loop that fits in a cache
const n = 64 * 1024 * 1024;
const next = new Uint32Array(n);
for (let i = 0; i < n; i++) next[i] = i;
let seed = 7;
for (let i = n - 1; i > 0; i--) {
  seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
  const j = seed % i;
  const tmp = next[i];
  next[i] = next[j];
  next[j] = tmp;
}
let at = 0;
t = performance.now();
for (let i = 0; i < READS; i++) at = next[at];
const readNs = ((performance.now() - t) * 1e6) / READS;

console.log(JSON.stringify({ aluMs: Math.round(aluMs), readNs: Math.round(readNs), check: (x ^ at) & 1 }));
