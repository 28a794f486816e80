// Times the stages of loading one plan: UTF-8 decoding, parsing, schema validation and
// normalisation, then the whole of loadPlanBytes, and locating paths (the first call, then 1000
// more, as diagnostics do). Uses the library in dist/ (run `npm run build`).
//   node bench/load-plan.mjs [PLAN] [--runs N] [--full]
// --full parses with the yaml library alone (the path every plan took before the fast reader).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const { decodeUtf8, parseSource, validatePlanData } = await import(join(ROOT, "dist/plan/source.js"));
const { normalizePlan } = await import(join(ROOT, "dist/plan/normalize.js"));
const { loadPlanBytes } = await import(join(ROOT, "dist/plan/load.js"));

const args = process.argv.slice(2);
const flag = (name) => args.includes(`--${name}`);
const opt = (name, dflt) => (args.includes(`--${name}`) ? args[args.indexOf(`--${name}`) + 1] : dflt);
const file = args.find((a, i) => !a.startsWith("--") && args[i - 1] !== "--runs") ?? join(ROOT, "bench/out/r20000/plan.yaml");
const runs = Number(opt("runs", 3));
const options = { fast: !flag("full") };
const bytes = readFileSync(file);
const ms = (t) => Math.round(t);

for (let r = 0; r < runs; r++) {
  const t0 = performance.now();
  const d = decodeUtf8(bytes, file);
  const t1 = performance.now();
  const src = parseSource(d.text, file, options);
  const t2 = performance.now();
  if (!src.ok) throw new Error(`${file} did not parse: ${src.diagnostics[0]?.message}`);
  const errors = validatePlanData(src.data, src.locate);
  const t3 = performance.now();
  const n = normalizePlan(src.data, file, src.locate);
  const t4 = performance.now();
  const whole = loadPlanBytes(bytes, file, options);
  const t5 = performance.now();
  if (errors.length > 0 || !n.ok || !whole.ok) throw new Error(`${file} did not load`);
  // a valid plan has no diagnostics, so this is the first call of the locator
  const nodes = Array.isArray(src.data.nodes) ? src.data.nodes.length : 1;
  const t6 = performance.now();
  src.locate(["nodes", nodes - 1, "name"]);
  const t7 = performance.now();
  for (let i = 0; i < 1000; i++) src.locate(["nodes", (i * 7919) % nodes, i % 2 ? "name" : "no-such-key"], { key: i % 3 === 0 });
  const t8 = performance.now();
  console.log(JSON.stringify({ run: r + 1, decode: ms(t1 - t0), parse: ms(t2 - t1), validate: ms(t3 - t2), normalize: ms(t4 - t3), loadPlanBytes: ms(t5 - t4), firstLocate: +(t7 - t6).toFixed(1), locate1000: +(t8 - t7).toFixed(1), rssMB: Math.round(process.memoryUsage().rss / 1e6) }));
}
