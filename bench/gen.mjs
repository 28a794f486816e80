// Writes the synthetic benchmark inputs: a plan of N routers (about 50 SIDs each), its lock, the
// SID table that sidcarve itself emits for it, and a copy of that table with a few planted defects
// plus a manifest that says where they are. Deterministic for a seed: the same --seed and
// --routers give the same bytes. Every name is invented; SIDs come from 5f00::/16 (RFC 9602),
// other prefixes are documentation prefixes (2001:db8::/32, RFC 3849).
//
// Usage: npm run build && node bench/gen.mjs [--routers 1000,5000,20000] [--seed 7] [--out bench/out]
// Writes OUT/r<N>/plan.yaml, plan.lock.json, plan.sids.csv (clean), table.csv (with defects) and
// defects.json.
import { execFileSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("..", import.meta.url));
const CLI = join(ROOT, "dist/cli/main.js");

/** Routers per site: two P routers, one route reflector, 22 PEs. */
export const ROUTERS_PER_SITE = 25;
const PES_PER_SITE = 22;

/** Regions and sites for a router count (a multiple of 25); chosen so the three sizes look alike. */
export function shapeFor(routers) {
  const sites = routers / ROUTERS_PER_SITE;
  if (!Number.isInteger(sites)) throw new Error(`--routers ${routers} is not a multiple of ${ROUTERS_PER_SITE}`);
  const regions = Math.max(1, Math.round(Math.sqrt(sites / 2.5)));
  const perRegion = Math.ceil(sites / regions);
  return { regions, perRegion, sites };
}

/** mulberry32: a small seeded generator (public-domain algorithm), enough for test data. */
export function rng(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

// Invented syllables for place names; combined they give thousands of distinct made-up names.
const HEAD = ["brack", "cor", "dun", "fen", "gal", "hol", "ister", "jarn", "kel", "lom", "mar", "nest", "orr", "pel", "quen", "ross", "sall", "tarn", "ulve", "wend", "yarr", "zell", "ash", "birk", "cald", "dray", "elm", "frith"];
const MID = ["", "a", "e", "i", "o", "en", "er", "in", "ow"];
const TAIL = ["mere", "holt", "wick", "ford", "stead", "vale", "brook", "fell", "haven", "moor", "ness", "thorpe", "gate", "combe", "ley", "by"];

/** `count` distinct invented names drawn with `rand`, never equal to one in `taken`. */
function names(rand, count, taken) {
  const out = [];
  let guard = 0;
  while (out.length < count) {
    const n = HEAD[Math.floor(rand() * HEAD.length)] + MID[Math.floor(rand() * MID.length)] + TAIL[Math.floor(rand() * TAIL.length)];
    const name = taken.has(n) ? `${n}${Math.floor(rand() * 90) + 10}` : n;
    if (++guard > count * 1000) throw new Error("name space exhausted");
    if (taken.has(name)) continue;
    taken.add(name);
    out.push(name);
  }
  return out;
}

const pad2 = (n) => String(n).padStart(2, "0");

/** The plan as YAML text (one flow mapping per list item, so the file stays readable at scale). */
export function planYaml(routers, seed) {
  const rand = rng(seed * 7919 + routers);
  const { regions, perRegion, sites } = shapeFor(routers);
  const taken = new Set();
  const regionNames = names(rand, regions, taken);
  const nodes = [];
  const links = [];
  const vrfs = [];
  const l2 = [];
  const anycast = [];
  const groups = [];
  const port = new Map();
  const nextPort = (n) => {
    const k = (port.get(n) ?? 0) + 1;
    port.set(n, k);
    return `port-${k}`;
  };
  const link = (a, b) => links.push(`  - { ends: [{ node: ${a}, interface: ${nextPort(a)} }, { node: ${b}, interface: ${nextPort(b)} }], protection: both }`);
  let siteCount = 0;
  const gateways = [];
  for (let r = 0; r < regions; r++) {
    const region = regionNames[r];
    const siteNames = names(rand, Math.min(perRegion, sites - siteCount), taken);
    siteCount += siteNames.length;
    groups.push(`  ${region}:\n    groups:\n${siteNames.map((s) => `      ${s}: {}`).join("\n")}`);
    const siteInfo = [];
    const regionPes = [];
    for (const site of siteNames) {
      const place = `${region}/${site}`;
      const p1 = `${site}-p1`;
      const p2 = `${site}-p2`;
      const rr = `${site}-rr1`;
      const pes = Array.from({ length: PES_PER_SITE }, (_, k) => `${site}-pe${pad2(k + 1)}`);
      const anyc = siteInfo.length === 0 ? ` anycast: [${region}-edge],` : "";
      nodes.push(`  - { name: ${p1}, place: ${place},${anyc} role: p }`, `  - { name: ${p2}, place: ${place},${anyc} role: p }`);
      nodes.push(`  - { name: ${rr}, place: ${place}, role: rr, algorithms: [0] }`);
      for (const pe of pes) nodes.push(`  - { name: ${pe}, place: ${place}, role: pe }`);
      link(p1, p2);
      link(rr, p1);
      link(rr, p2);
      for (const pe of pes) {
        link(pe, p1);
        link(pe, p2);
      }
      siteInfo.push({ site, place, p1, p2, pes });
      regionPes.push(...pes);
    }
    if (siteInfo.length > 0) anycast.push(`  - { name: ${region}-edge, place: ${siteInfo[0].place} }`);
    // a ring through the sites of the region
    if (siteInfo.length > 1) siteInfo.forEach((s, i) => link(s.p1, siteInfo[(i + 1) % siteInfo.length].p2));
    if (siteInfo.length > 0) gateways.push(siteInfo[0]);

    // Services. 24 VRFs per region; every PE joins 18 of them. Modes cycle through split
    // (End.DT4 + End.DT6), combined (End.DT46) and IPv4 only; the last VRF runs over Flex-Algo 128.
    const VRFS = 24;
    const members = Array.from({ length: VRFS }, () => []);
    const ces = Array.from({ length: VRFS }, () => []);
    for (const pe of regionPes) {
      const pick = new Set();
      while (pick.size < 18) pick.add(Math.floor(rand() * VRFS));
      const list = [...pick].sort((a, b) => a - b);
      for (const v of list) members[v].push(pe);
      // four per-CE cross-connects (End.DX4 / End.DX6) in split VRFs the PE is in
      const split = list.filter((v) => v % 3 === 0);
      for (let c = 0; c < 4 && split.length > 0; c++) {
        const v = split[c % split.length];
        ces[v].push(`      - { name: ${pe}-ce${c + 1}, pe: ${pe}, family: ${c % 2 === 0 ? "ipv4" : "ipv6"}, interface: cust-${c + 1} }`);
      }
    }
    for (let v = 0; v < VRFS; v++) {
      if (members[v].length === 0) continue;
      const mode = v % 3 === 0 ? "families: [ipv4, ipv6]\n    mode: split" : v % 3 === 1 ? "families: [ipv4, ipv6]\n    mode: combined" : "families: [ipv4]";
      const algo = v === VRFS - 1 ? "\n    algorithm: 128" : "";
      let text = `  - name: ${region}-vpn${pad2(v + 1)}\n    table: ${100 + v}\n    ${mode}${algo}\n    pes: [${members[v].join(", ")}]`;
      if (ces[v].length > 0) text += `\n    ces:\n${ces[v].join("\n")}`;
      vrfs.push(text);
    }
    // L2: each PE is in four point-to-point wires (End.DX2), two VLAN wires (End.DX2V) and one
    // of four bridge domains (End.DT2U + End.DT2M).
    const shuffled = (list) => {
      const a = [...list];
      for (let i = a.length - 1; i > 0; i--) {
        const j = Math.floor(rand() * (i + 1));
        [a[i], a[j]] = [a[j], a[i]];
      }
      return a;
    };
    let w = 0;
    for (let round = 0; round < 4; round++) {
      const order = shuffled(regionPes);
      for (let i = 0; i + 1 < order.length; i += 2) {
        w++;
        l2.push(`  - { name: ${region}-wire${w}, kind: wire, attachments: [{ node: ${order[i]}, interface: l2-${round + 1} }, { node: ${order[i + 1]}, interface: l2-${round + 1} }] }`);
      }
    }
    let vw = 0;
    for (let round = 0; round < 2; round++) {
      const order = shuffled(regionPes);
      for (let i = 0; i + 1 < order.length; i += 2) {
        vw++;
        const vlan = 100 + round;
        l2.push(`  - { name: ${region}-vwire${vw}, kind: vlan-wire, attachments: [{ node: ${order[i]}, interface: trunk-1, vlan: ${vlan} }, { node: ${order[i + 1]}, interface: trunk-1, vlan: ${vlan} }] }`);
      }
    }
    for (let b = 0; b < 4; b++) {
      const bn = regionPes.filter((_, i) => i % 4 === b);
      if (bn.length > 0) l2.push(`  - { name: ${region}-bridge${b + 1}, kind: bridge, nodes: [${bn.join(", ")}] }`);
    }
  }
  // the regions' gateway sites in a ring
  if (gateways.length > 1) gateways.forEach((g, i) => link(g.p2, gateways[(i + 1) % gateways.length].p1));

  return `# GENERATED by bench/gen.mjs (seed ${seed}); an invented network for benchmarks only.
# ${routers} routers in ${regions} regions; every name is invented. SIDs come from 5f00::/16 (RFC 9602).
sidcarve: 1
plan: bench-r${routers}
operator: Benchmark Networks (invented)
algorithms:
  - { id: 0, name: default }
  - { id: 128, name: low-delay }
levels:
  - { name: region, bits: 6, order: leftmost, reserved: [0] }
  - { name: site, bits: 9, order: centremost }
  - { name: router, bits: 16, reserved: [0] }
blocks:
  - name: core
    prefix: "5f00:b000::/32"
    algorithms: [0, 128]
    algorithm-bits: 1
    structure: { node: 32, function: 16, argument: 16 }
end-sids:
  - flavors: []
  - flavors: [PSP, USD]
adjacency-flavors: [PSP]
groups:
${groups.join("\n")}
anycast:
${anycast.join("\n")}
nodes:
${nodes.join("\n")}
links:
${links.join("\n")}
vrfs:
${vrfs.join("\n")}
l2-services:
${l2.join("\n")}
infrastructure:
  - { name: loopbacks, prefix: "2001:db8:100::/48", kind: loopback }
  - { name: core-links, prefix: "2001:db8:101::/48", kind: link }
`;
}

/**
 * Plant defects into an emitted CSV table. Each defect names a `marker` (an address or prefix as
 * text) that a finding must quote among its objects for the defect to count as found.
 */
export async function plantDefects(csvText, seed) {
  const { parseAddr, formatAddr } = await import(join(ROOT, "dist/net/text.js"));
  const rand = rng(seed * 104729 + 17);
  const lines = csvText.split("\r\n");
  // lines[0] is the banner, lines[1] the header; data rows follow (the last element is "").
  const header = lines[1].split(",");
  const col = Object.fromEntries(header.map((h, i) => [h, i]));
  const data = lines.slice(2, lines.length - 1).map((l) => l.split(","));
  const nodesInOrder = [];
  for (const r of data) if (nodesInOrder[nodesInOrder.length - 1] !== r[col.node]) nodesInOrder.push(r[col.node]);
  const used = new Set();
  const pickRow = (pred) => {
    for (let guard = 0; guard < 1e6; guard++) {
      const i = Math.floor(rand() * data.length);
      const r = data[i];
      if (used.has(r[col.node]) || !pred(r)) continue;
      used.add(r[col.node]);
      return i;
    }
    throw new Error("no row fits");
  };
  const isPe = (r) => /-pe\d+$/.test(r[col.node]);
  const defects = [];
  // 1. the SID of one PE also on another PE (a copy of the row under the other node's name)
  {
    const i = pickRow((r) => isPe(r) && r[col.behavior] === "End.DT4");
    const j = pickRow((r) => isPe(r));
    const copy = [...data[i]];
    copy[col.node] = data[j][col.node];
    copy[col.locator] = data[j][col.locator];
    data.splice(j + 1, 0, copy);
    defects.push({ kind: "duplicate SID on another node", marker: copy[col.sid], expect: "sid-duplicate" });
  }
  // 2. a SID outside its locator: the router value 0xfffe is never handed out (routers count up from 1)
  {
    const i = pickRow((r) => r[col.behavior] === "End.X" && r[col.algorithm] === "0");
    const a = parseAddr(data[i][col.sid]);
    const moved = (a.value & ~(0xffffn << 64n)) | (0xfffen << 64n);
    data[i][col.sid] = formatAddr(moved);
    defects.push({ kind: "SID outside its locator", marker: data[i][col.sid], expect: "sid-outside-locator" });
  }
  // 3. an overlapping locator: one row advertises a /56 that covers its neighbours' /64 locators
  {
    const i = pickRow((r) => isPe(r) && r[col.behavior] === "End");
    const [addr] = data[i][col.locator].split("/");
    const a = parseAddr(addr);
    const wide = `${formatAddr(a.value & ~((1n << 72n) - 1n))}/56`;
    data[i][col.locator] = wide;
    defects.push({ kind: "overlapping locator", marker: wide, expect: "locator-overlap" });
  }
  // 4. a row whose address cannot be read
  {
    const i = pickRow(() => true);
    data[i][col.sid] = data[i][col.sid].replace(/^5f00:b000:/, "5f00:b0g0:");
    defects.push({ kind: "bad address", marker: data[i][col.sid], expect: "table-row" });
  }
  // 5. a wrong codepoint: an End with PSP+USD advertised with End.X's codepoint (IANA "SRv6 Endpoint Behaviors": End.X = 5)
  {
    const i = pickRow((r) => r[col.behavior] === "End" && r[col.flavors] === "PSP+USD");
    data[i][col.codepoint] = "5";
    defects.push({ kind: "wrong codepoint", marker: data[i][col.sid], expect: "a codepoint rule" });
  }
  // 6. a structure that does not add up: block bits 40 under a /32 block with a /64 locator
  {
    const i = pickRow((r) => r[col.behavior] === "End.DT6");
    data[i][col.block_bits] = "40";
    defects.push({ kind: "SID structure disagrees with its locator", marker: data[i][col.sid], expect: "a structure rule" });
  }
  const rows = data.map((r) => r.join(","));
  // row numbers (1-based data rows) for the manifest
  for (const d of defects) d.row = data.findLastIndex((r) => r.includes(d.marker) || r[col.locator] === d.marker) + 1;
  return { text: [lines[0], lines[1], ...rows, ""].join("\r\n"), defects };
}

function sidcarve(args) {
  execFileSync(process.execPath, [CLI, ...args], { stdio: ["ignore", "ignore", "inherit"], maxBuffer: 1 << 30 });
}

/** Generate one size into `dir`. */
export async function generate(routers, seed, dir) {
  mkdirSync(dir, { recursive: true });
  const plan = join(dir, "plan.yaml");
  writeFileSync(plan, planYaml(routers, seed));
  sidcarve(["allocate", plan]);
  sidcarve(["emit", plan, "--format", "csv", "--out", dir, "--force"]);
  const clean = readFileSync(join(dir, `bench-r${routers}.sids.csv`), "utf8");
  const { text, defects } = await plantDefects(clean, seed);
  writeFileSync(join(dir, "table.csv"), text);
  writeFileSync(join(dir, "defects.json"), JSON.stringify(defects, null, 2) + "\n");
  return { plan, table: join(dir, "table.csv"), clean: join(dir, `bench-r${routers}.sids.csv`), defects };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const arg = (name, dflt) => {
    const i = process.argv.indexOf(`--${name}`);
    return i >= 0 ? process.argv[i + 1] : dflt;
  };
  const sizes = String(arg("routers", "1000,5000,20000")).split(",").map(Number);
  const seed = Number(arg("seed", "7"));
  const out = arg("out", join(ROOT, "bench/out"));
  for (const n of sizes) {
    const t0 = Date.now();
    const r = await generate(n, seed, join(out, `r${n}`));
    process.stderr.write(`r${n}: ${r.table} (${r.defects.length} defects) in ${((Date.now() - t0) / 1000).toFixed(1)} s\n`);
  }
}
