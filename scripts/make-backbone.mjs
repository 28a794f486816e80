// Writes sample-plans/tessaline-backbone.yaml: the invented "Tessaline Transit" backbone, built
// from fixed tables and arithmetic only (no randomness), so every run writes the same bytes.
// Usage: node scripts/make-backbone.mjs [--stdout]
import { writeFileSync } from "node:fs";

const OUT = new URL("../sample-plans/tessaline-backbone.yaml", import.meta.url);

// Three invented regions with six invented sites each. The first site of a region is its gateway
// (two border routers sharing an anycast locator), the second one hosts a route reflector.
const REGIONS = [
  { name: "kestmoor", sites: ["mirewatch", "cobbleford", "ashlynd", "greywater", "thornmere", "quillby"] },
  { name: "orrinvale", sites: ["lampreth", "dunmallow", "copperhythe", "wendle", "briarholt", "stavenmoor"] },
  { name: "saltherne", sites: ["gullhaven", "reedmarsh", "tidewell", "marrowcliff", "sandpeller", "eelbrook"] },
];

/** PEs per site: 9..15, varied by a fixed formula so sites differ in size. */
const pesAt = (r, s) => 9 + ((r * 7 + s * 5) % 7);
const pad2 = (n) => String(n).padStart(2, "0");

// ---- nodes
const nodes = []; // { name, place, role, algorithms? }
const sitesOf = []; // per region, per site: { place, p1, p2, pes[], bx[], rr }
REGIONS.forEach((region, r) => {
  sitesOf.push([]);
  region.sites.forEach((site, s) => {
    const place = `${region.name}/${site}`;
    const info = { place, site, p1: `${site}-p1`, p2: `${site}-p2`, pes: [], bx: [], rr: undefined };
    nodes.push({ name: info.p1, place, role: "p" }, { name: info.p2, place, role: "p" });
    if (s === 0) {
      for (const k of [1, 2]) {
        const name = `${site}-bx${k}`;
        info.bx.push(name);
        nodes.push({ name, place, role: "border", anycast: [`${region.name}-edge`] });
      }
    }
    if (s === 1) {
      info.rr = `${site}-rr1`;
      nodes.push({ name: info.rr, place, role: "rr", algorithms: [0] });
    }
    for (let k = 1; k <= pesAt(r, s); k++) {
      const name = `${site}-pe${pad2(k)}`;
      info.pes.push(name);
      // pe01..pe03 also run Flex-Algo 128; the other PEs only the default algorithm.
      nodes.push(k <= 3 ? { name, place, role: "pe" } : { name, place, role: "pe", algorithms: [0] });
    }
    sitesOf[r].push(info);
  });
});

// ---- links (interfaces numbered per node in the order links are made)
const ports = new Map();
const port = (node) => {
  const n = (ports.get(node) ?? 0) + 1;
  ports.set(node, n);
  return `port-${n}`;
};
const links = { core: [], ring: [], border: [], access: [] };
const link = (group, a, b, protection) => links[group].push({ a, pa: port(a), b, pb: port(b), protection });
sitesOf.forEach((sites) => {
  for (const st of sites) {
    link("core", st.p1, st.p2, "both");
    for (const bx of st.bx) {
      link("core", bx, st.p1, "both");
      link("core", bx, st.p2, "both");
    }
    if (st.rr) {
      link("access", st.rr, st.p1, "unprotected");
      link("access", st.rr, st.p2, "unprotected");
    }
    for (const pe of st.pes) {
      link("access", pe, st.p1, "unprotected");
      link("access", pe, st.p2, "unprotected");
    }
  }
  // a ring through the sites of the region, plus three chords across it
  sites.forEach((st, i) => link("ring", st.p1, sites[(i + 1) % sites.length].p2, "both"));
  for (let i = 0; i < 3; i++) link("ring", sites[i].p2, sites[i + 3].p1, "both");
});
// the three gateways in a full mesh: bx1 to bx1 and bx2 to bx2
for (let r = 0; r < REGIONS.length; r++) {
  for (let q = r + 1; q < REGIONS.length; q++) {
    for (let k = 0; k < 2; k++) link("border", sitesOf[r][0].bx[k], sitesOf[q][0].bx[k], "both");
  }
}

// ---- services
const allSites = sitesOf.flat();
const vrfs = [
  { name: "civic", table: 100, families: ["ipv4", "ipv6"], mode: "combined", pes: allSites.flatMap((st) => [st.pes[0], st.pes[3]]) },
  { name: "lorries", table: 110, families: ["ipv4", "ipv6"], mode: "split", pes: allSites.map((st) => st.pes[1]) },
  { name: "meters", table: 120, families: ["ipv4"], pes: allSites.filter((_, i) => i % 2 === 0).map((st) => st.pes[4]) },
  { name: "tidal-desk", table: 128, families: ["ipv4", "ipv6"], mode: "combined", algorithm: 128, pes: allSites.map((st) => st.pes[2]) },
  {
    name: "portside",
    table: 130,
    families: ["ipv4", "ipv6"],
    mode: "split",
    pes: allSites.filter((_, i) => i % 3 === 0).map((st) => st.pes[5]),
    ces: allSites
      .filter((_, i) => i % 3 === 0)
      .flatMap((st, i) => [
        { name: `${st.site}-quay${i + 1}`, pe: st.pes[5], family: "ipv4", interface: "cust-1" },
        { name: `${st.site}-quay${i + 1}-v6`, pe: st.pes[5], family: "ipv6", interface: "cust-1" },
      ]),
  },
];
const pe = (r, s, k) => sitesOf[r][s].pes[k];
const l2 = [
  { name: "ferry-wire-1", kind: "wire", attachments: [{ node: pe(0, 2, 6), interface: "cust-2" }, { node: pe(1, 4, 6), interface: "cust-2" }] },
  { name: "ferry-wire-2", kind: "wire", attachments: [{ node: pe(1, 1, 6), interface: "cust-2" }, { node: pe(2, 3, 6), interface: "cust-2" }] },
  {
    name: "depot-vlans",
    kind: "vlan-wire",
    attachments: [
      { node: pe(0, 1, 7), interface: "cust-3", vlan: 101 },
      { node: pe(0, 1, 7), interface: "cust-3", vlan: 102 },
      { node: pe(2, 5, 7), interface: "cust-3", vlan: 101 },
      { node: pe(2, 5, 7), interface: "cust-3", vlan: 102 },
    ],
  },
  { name: "market-lan", kind: "bridge", nodes: [0, 1, 2].flatMap((r) => [pe(r, 3, 8), pe(r, 4, 8)]) },
];
const gw = (r, k) => sitesOf[r][0].bx[k];
const policies = [
  { name: "kestmoor-to-saltherne-fast", node: gw(0, 0), behavior: "End.B6.Encaps", algorithm: 128, endpoint: gw(2, 0), color: 128 },
  { name: "orrinvale-to-kestmoor-lean", node: gw(1, 1), behavior: "End.B6.Encaps.Red", endpoint: gw(0, 1), color: 20 },
  { name: "saltherne-label-bridge", node: gw(2, 0), behavior: "End.BM", endpoint: gw(1, 0), color: 30 },
];
const tables = [{ name: "transit-v6", table: 200, nodes: [0, 1, 2].flatMap((r) => sitesOf[r][0].bx) }];

// ---- YAML text (flow style, one object per line; names are plain, addresses and ranges quoted)
const q = (v) => (typeof v === "number" ? String(v) : /^[a-z][a-z0-9-]*$/.test(v) ? v : JSON.stringify(v));
const flow = (o) => {
  if (Array.isArray(o)) return `[${o.map(flow).join(", ")}]`;
  if (o !== null && typeof o === "object") {
    const parts = Object.entries(o)
      .filter(([, v]) => v !== undefined)
      .map(([k, v]) => `${k}: ${flow(v)}`);
    return `{ ${parts.join(", ")} }`;
  }
  return q(o);
};
const lines = [];
const out = (s = "") => lines.push(s);
const countLinks = Object.values(links).reduce((n, l) => n + l.length, 0);

out("# GENERATED by scripts/make-backbone.mjs; do not edit by hand, change the script and re-run");
out("# `node scripts/make-backbone.mjs`.");
out("# Tessaline Transit is an invented operator: every region, site, router and customer here is");
out("# invented. SIDs come from 5f00::/16 (RFC 9602); other prefixes are documentation prefixes");
out("# (2001:db8::/32, RFC 3849; 3fff::/20, RFC 9637).");
out(`# A three-region backbone: ${nodes.length} routers, ${countLinks} links, NEXT-CSID with 16-bit C-SIDs (RFC 9800).`);
out("sidcarve: 1");
out("plan: tessaline-backbone");
out("operator: Tessaline Transit (invented for the demo)");
out("description: Three regions of six sites; NEXT-CSID 16-bit C-SIDs, Flex-Algo 128 in a block of its own.");
out();
out("algorithms:");
out("  - { id: 0, name: default }");
out("  - { id: 128, name: low-latency }");
out();
out("# 16 node bits = one 16-bit C-SID. Region values 12-15 are reserved because they would put node");
out("# C-SIDs at 0xc000 and above, which is the local pool (LIB) below; region 0 is kept free too.");
out("levels:");
out('  - { name: region, bits: 4, order: leftmost, reserved: [0, "12-15"] }');
out("  - { name: site, bits: 5, order: centremost }");
out("  - { name: router, bits: 7, order: rightmost, reserved: [0] }");
out();
out("# Our own split of the 16-bit C-SID space (RFC 9800 §5 leaves it to the deployment):");
out("# GIB 0x0100-0xbfff for node C-SIDs, LIB 0xc000-0xfeff for every local function, 0xff00-0xffff unused.");
out("# A /32 block with 16-bit C-SIDs is the combination every NEXT-CSID node must support (RFC 9800 §4.1).");
out("# End.DT2M takes 16 argument bits (Arg.FE2, RFC 8986 §4.12).");
out("blocks:");
for (const [name, prefix, algo] of [
  ["core", "5f00:7e50::/32", 0],
  ["low-latency", "5f00:7e51::/32", 128],
]) {
  out(`  - name: ${name}`);
  out(`    prefix: "${prefix}"`);
  out(`    algorithms: [${algo}]`);
  out('    compression: { flavor: next-csid, csid-bits: 16, global-pool: ["0x0100-0xbfff"], local-pool: ["0xc000-0xfeff"], argument: 16 }');
}
out();
out("# Function pools inside the LIB, one range per kind of SID.");
out("function-pools:");
out('  end: ["0xc000-0xc0ff"]');
out('  adjacency: ["0xc100-0xcfff"]');
out('  service: ["0xd000-0xdfff"]');
out('  l2: ["0xe000-0xefff"]');
out('  binding: ["0xf000-0xf7ff"]');
out('  table: ["0xf800-0xfeff"]');
out();
out("end-sids:");
out("  - flavors: []");
out("  - flavors: [PSP, USD]");
out("adjacency-flavors: [PSP]");
out();
out("groups:");
for (const region of REGIONS) {
  out(`  ${region.name}:`);
  out("    groups:");
  for (const site of region.sites) out(`      ${site}: {}`);
}
out();
out("# Border routers of each gateway share one anycast locator per algorithm.");
out("anycast:");
for (const region of REGIONS) out(`  - ${flow({ name: `${region.name}-edge`, place: `${region.name}/${region.sites[0]}` })}`);
out();
out("nodes:");
let lastPlace = "";
for (const n of nodes) {
  if (n.place !== lastPlace) out(`  # ${n.place}`);
  lastPlace = n.place;
  out(`  - ${flow(n)}`);
}
out();
out("links:");
const linkTitles = {
  core: "inside each site: the P pair and the border routers, protected and unprotected End.X",
  ring: "the ring and chords through the sites of each region",
  border: "between the gateways of the three regions",
  access: "PE and route-reflector uplinks to both P routers of their site",
};
for (const [group, list] of Object.entries(links)) {
  out(`  # ${linkTitles[group]}`);
  for (const l of list) {
    const ends = [{ node: l.a, interface: l.pa }, { node: l.b, interface: l.pb }];
    out(`  - ${flow(l.protection === "unprotected" ? { ends } : { ends, protection: l.protection })}`);
  }
}
out();
out("vrfs:");
for (const v of vrfs) {
  const { ces, ...rest } = v;
  Object.entries(rest).forEach(([k, val], i) => out(`  ${i === 0 ? "- " : "  "}${k}: ${flow(val)}`));
  if (ces) {
    out("    ces:");
    for (const c of ces) out(`      - ${flow(c)}`);
  }
}
out();
out("l2-services:");
for (const s of l2) out(`  - ${flow(s)}`);
out();
out("policies:");
for (const p of policies) out(`  - ${flow(p)}`);
out();
out("tables:");
for (const t of tables) out(`  - ${flow(t)}`);
out();
out("infrastructure:");
out('  - { name: loopbacks, prefix: "2001:db8:7e50::/48", kind: loopback }');
out('  - { name: core-links, prefix: "2001:db8:7e51::/48", kind: link }');
out('  - { name: customers, prefix: "3fff:7e5::/32", kind: customer }');

const text = lines.join("\n") + "\n";
if (process.argv.includes("--stdout")) process.stdout.write(text);
else {
  writeFileSync(OUT, text);
  console.log(`sample-plans/tessaline-backbone.yaml: ${nodes.length} routers, ${countLinks} links`);
}
