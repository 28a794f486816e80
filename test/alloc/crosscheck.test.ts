/**
 * Cross-checks of the two sample plans against independent implementations: containment of every
 * SID in its locator and disjointness of locators with ipaddr.js and with Python 3's ipaddress (one
 * python3 call for the whole batch), RFC 5952 text with ip-address, and every behaviour codepoint
 * against a small table copied from the IANA registry. Everything is read from the emitted CSV and
 * JSON, i.e. what a field engineer gets.
 */
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { Address6 } from "ip-address";
import ipaddr from "ipaddr.js";
import { beforeAll, describe, expect, it } from "vitest";
import type { Allocation } from "../../src/alloc/allocate.js";
import { tableToCsv } from "../../src/emit/csv.js";
import { tableToJson } from "../../src/emit/json.js";
import { alloc, planFile } from "../helpers/plans.js";
import { runPython } from "../helpers/python.js";

const ROOT = new URL("../../", import.meta.url);
const SAMPLES = ["sample-plans/harbourline-metro.yaml", "sample-plans/tessaline-backbone.yaml"] as const;

/**
 * IANA "SRv6 Endpoint Behaviors" registry (RFC 8986 §10.2.2 Table 6 for PSP/USP/USD; RFC 9800 Table 1
 * for NEXT-CSID), written out by hand for every combination the sample plans use.
 */
const IANA_CODEPOINTS: Readonly<Record<string, number>> = {
  "End|": 1, // IANA: End
  "End|PSP+USD": 29, // IANA: End with PSP & USD
  "End.X|": 5, // IANA: End.X
  "End.X|PSP": 6, // IANA: End.X with PSP
  "End.T|": 9, // IANA: End.T
  "End.DX6|": 16, // IANA: End.DX6
  "End.DX4|": 17, // IANA: End.DX4
  "End.DT6|": 18, // IANA: End.DT6
  "End.DT4|": 19, // IANA: End.DT4
  "End.DT46|": 20, // IANA: End.DT46
  "End.DX2|": 21, // IANA: End.DX2
  "End.DX2V|": 22, // IANA: End.DX2V
  "End.DT2U|": 23, // IANA: End.DT2U
  "End.DT2M|": 24, // IANA: End.DT2M
  "End|NEXT-CSID": 43, // IANA: End with NEXT-CSID (RFC 9800)
  "End|PSP+USD+NEXT-CSID": 48, // IANA: End with NEXT-CSID, PSP & USD (RFC 9800)
  "End.X|PSP+NEXT-CSID": 53, // IANA: End.X with NEXT-CSID & PSP (RFC 9800)
  "End.T|NEXT-CSID": 85, // IANA: End.T with NEXT-CSID (RFC 9800)
  "End.B6.Encaps|NEXT-CSID": 93, // IANA: End.B6.Encaps with NEXT-CSID (RFC 9800)
  "End.B6.Encaps.Red|NEXT-CSID": 94, // IANA: End.B6.Encaps.Red with NEXT-CSID (RFC 9800)
  "End.BM|NEXT-CSID": 95, // IANA: End.BM with NEXT-CSID (RFC 9800)
};

interface Row {
  node: string;
  algorithm: number;
  locator: string;
  sid: string;
  behavior: string;
  flavors: string;
  codepoint: string;
  function: string;
  bits: [number, number, number, number];
}

interface Sample {
  file: string;
  allocation: Allocation;
  rows: Row[];
  /** Distinct locators: every node locator, and each anycast locator once. */
  locators: { prefix: string; owner: string }[];
}

/** Read the emitted CSV (RFC 4180; our cells hold no commas or quotes, which the test checks). */
function readCsv(text: string): Row[] {
  const lines = text.split("\r\n");
  expect(lines.pop()).toBe("");
  return lines.slice(2).map((line) => {
    expect(line).not.toMatch(/"/);
    const c = line.split(",");
    expect(c).toHaveLength(13);
    return {
      node: c[0]!,
      algorithm: Number(c[1]),
      locator: c[2]!,
      sid: c[3]!,
      behavior: c[4]!,
      flavors: c[5]!,
      codepoint: c[6]!,
      function: c[7]!,
      bits: [Number(c[8]), Number(c[9]), Number(c[10]), Number(c[11])],
    };
  });
}

function load(file: string): Sample {
  const allocation = alloc(planFile(new URL(file, ROOT).pathname));
  const rows = readCsv(tableToCsv(allocation.table));
  const json = JSON.parse(tableToJson(allocation.table)) as { nodes: { node: string; locators: { prefix: string; anycast: string | null }[] }[] };
  const byPrefix = new Map<string, string>();
  for (const n of json.nodes) for (const l of n.locators) byPrefix.set(l.prefix, l.anycast ? `anycast:${l.anycast}` : n.node);
  return { file, allocation, rows, locators: [...byPrefix].map(([prefix, owner]) => ({ prefix, owner })) };
}

const samples: Sample[] = [];
let python: { overlapping: [string, string][]; outside: [string, string][]; notCanonical: string[]; badNetworks: string[]; sids: number; locators: number }[];

beforeAll(() => {
  for (const f of SAMPLES) samples.push(load(f));
  // cross-check: Python 3 ipaddress — one python3 process for both plans.
  python = runPython(
    `
import ipaddress
out = []
for p in INPUT:
    bad_networks = []
    nets = []
    for text in p["locators"]:
        try:
            nets.append((text, ipaddress.ip_network(text)))  # strict: host bits are an error
        except ValueError:
            bad_networks.append(text)
    overlapping = [[a, b] for i, (a, x) in enumerate(nets) for (b, y) in nets[i + 1:] if x.overlaps(y)]
    outside = [[s, l] for s, l in p["sids"] if ipaddress.ip_address(s) not in ipaddress.ip_network(l)]
    not_canonical = [s for s, _ in p["sids"] if str(ipaddress.ip_address(s)) != s]
    not_canonical += [l for l in p["locators"] if str(ipaddress.ip_network(l, strict=False)) != l]
    out.append({"overlapping": overlapping, "outside": outside, "notCanonical": not_canonical, "badNetworks": bad_networks, "sids": len(p["sids"]), "locators": len(nets)})
print(json.dumps(out))
`,
    samples.map((s) => ({ locators: s.locators.map((l) => l.prefix), sids: s.rows.map((r) => [r.sid, r.locator]) })),
  );
});

describe.each(SAMPLES.map((f, i) => [f, i] as const))("%s", (_file, i) => {
  const sample = () => samples[i]!;

  it("has a realistic size", () => {
    const s = sample();
    expect(s.rows.length).toBeGreaterThan(50);
    expect(s.locators.length).toBeGreaterThanOrEqual(s.allocation.plan.nodes.length);
  });

  it("every SID lies in its locator (cross-check: ipaddr.js)", () => {
    const outside = sample().rows.filter((r) => !ipaddr.parse(r.sid).match(ipaddr.parseCIDR(r.locator)));
    expect(outside.map((r) => `${r.node} ${r.sid} ${r.locator}`)).toEqual([]);
  });

  it("every SID's locator is one of its node's locators, and the structure fits 128 bits (RFC 8986 §3.1)", () => {
    const s = sample();
    const own = new Map(s.allocation.table.nodes.map((n) => [n.node, new Set(n.locators.map((l) => l.prefix.format()))]));
    for (const r of s.rows) {
      expect(own.get(r.node)!.has(r.locator), `${r.node} ${r.sid}`).toBe(true);
      expect(r.bits.reduce((a, b) => a + b, 0)).toBeLessThanOrEqual(128);
      expect(r.bits[0] + r.bits[1]).toBe(Number(r.locator.split("/")[1]));
    }
  });

  it("locators are pairwise disjoint; anycast locators are counted once (cross-check: ipaddr.js)", () => {
    const nets = sample().locators.map((l) => ({ ...l, cidr: ipaddr.parseCIDR(l.prefix) }));
    const overlapping: string[] = [];
    for (let a = 0; a < nets.length; a++) {
      for (let b = a + 1; b < nets.length; b++) {
        const [x, y] = [nets[a]!, nets[b]!];
        // two prefixes overlap exactly when the shorter one holds the other's first address
        const hit = x.cidr[1] <= y.cidr[1] ? y.cidr[0].match(x.cidr) : x.cidr[0].match(y.cidr);
        if (hit) overlapping.push(`${x.owner} ${x.prefix} / ${y.owner} ${y.prefix}`);
      }
    }
    expect(overlapping).toEqual([]);
  });

  it("SIDs are unique except where anycast members share a locator", () => {
    const s = sample();
    const anycast = new Set(s.locators.filter((l) => l.owner.startsWith("anycast:")).map((l) => l.prefix));
    const seen = new Map<string, string>();
    const dup: string[] = [];
    for (const r of s.rows) {
      const owner = anycast.has(r.locator) ? `any ${r.locator}` : r.node;
      const had = seen.get(r.sid);
      if (had !== undefined && had !== owner) dup.push(`${r.sid}: ${had} and ${owner}`);
      seen.set(r.sid, owner);
    }
    expect(dup).toEqual([]);
  });

  it("containment, disjointness and canonical text agree with Python 3 ipaddress", () => {
    const p = python[i]!;
    expect(p.sids).toBe(sample().rows.length);
    expect(p.locators).toBe(sample().locators.length);
    expect(p.badNetworks).toEqual([]); // cross-check: Python 3 ipaddress, strict ip_network (no host bits)
    expect(p.overlapping).toEqual([]); // cross-check: Python 3 ipaddress, ip_network(...).overlaps
    expect(p.outside).toEqual([]); // cross-check: Python 3 ipaddress, ip_address(x) in net
    expect(p.notCanonical).toEqual([]); // cross-check: Python 3 ipaddress str() (RFC 5952 form)
  });

  it("SID and locator text is RFC 5952 canonical (cross-check: ip-address correctForm)", () => {
    const s = sample();
    const bad: string[] = [];
    for (const r of s.rows) {
      if (new Address6(r.sid).correctForm() !== r.sid) bad.push(r.sid);
      const [addr, len] = r.locator.split("/");
      if (new Address6(addr!).correctForm() !== addr || !/^\d+$/.test(len!)) bad.push(r.locator);
    }
    // The text printed for each node's SIDs, in order, is ip-address's form of the 128-bit value.
    const printed = s.rows.map((r) => `${r.node} ${r.sid}`);
    const expected = s.allocation.table.nodes.flatMap((n) => n.sids.map((x) => `${n.node} ${Address6.fromBigInt(x.sid).correctForm()}`));
    expect(printed).toEqual(expected);
    expect(bad).toEqual([]);
  });

  it("every codepoint is the IANA value for its behaviour and flavours", () => {
    const wrong = sample()
      .rows.map((r) => ({ r, want: IANA_CODEPOINTS[`${r.behavior}|${r.flavors}`] }))
      .filter(({ r, want }) => want === undefined || String(want) !== r.codepoint)
      .map(({ r, want }) => `${r.behavior} ${r.flavors}: ${r.codepoint} (IANA ${want ?? "not in the test table"})`);
    expect([...new Set(wrong)]).toEqual([]);
  });
});

describe("the NEXT-CSID backbone follows its own GIB/LIB split", () => {
  // RFC 9800 §5: node C-SIDs from the GIB, local functions from the LIB, C-SID 0 never used. The
  // plan sets GIB 0x0100-0xbfff and LIB 0xc000-0xfeff on /32 blocks with 16-bit C-SIDs, so the
  // node C-SID is bytes 4-5 of a SID and the local C-SID bytes 6-7 (read here with ipaddr.js).
  const backbone = () => samples[1]!;
  const bytes = (text: string) => ipaddr.IPv6.parse(text).toByteArray();
  const u16 = (b: number[], at: number) => (b[at]! << 8) | b[at + 1]!;

  it("node C-SIDs lie in the GIB and function C-SIDs in the LIB", () => {
    const bad: string[] = [];
    for (const r of backbone().rows) {
      const b = bytes(r.sid);
      const node = u16(b, 4);
      if (node < 0x0100 || node > 0xbfff) bad.push(`${r.sid} node ${node.toString(16)}`);
      const fn = u16(b, 6);
      if (r.bits[2] === 16 && (fn < 0xc000 || fn > 0xfeff)) bad.push(`${r.sid} function ${fn.toString(16)}`);
      if (r.bits[2] === 0 && fn !== 0) bad.push(`${r.sid} has a function but claims none`);
      if (b.slice(8).some((x) => x !== 0)) bad.push(`${r.sid} has argument bits set`); // RFC 9800 §8: advertised with argument 0
    }
    expect(bad).toEqual([]);
  });

  it("each node's first End SID is its global C-SID alone; End.DT2M carries 16 argument bits", () => {
    const rows = backbone().rows;
    const ends = rows.filter((r) => r.behavior === "End" && r.flavors === "NEXT-CSID");
    for (const r of ends) {
      expect(r.sid).toBe(ipaddr.parseCIDR(r.locator)[0].toString()); // RFC 9800 §5.3: LBL 32 + LNL 16, FL 0
      expect(r.bits).toEqual([32, 16, 0, 80]); // AL = 128 - LBL - LNL (RFC 9800 §8)
    }
    expect(ends.length).toBeGreaterThan(backbone().allocation.plan.nodes.length);
    const dt2m = rows.filter((r) => r.behavior === "End.DT2M");
    expect(dt2m.length).toBeGreaterThan(0);
    for (const r of dt2m) expect(r.bits).toEqual([32, 16, 16, 16]); // compression.argument: 16 (Arg.FE2, RFC 8986 §4.12)
  });

  it("covers the plan's promises: about 250-320 routers, both algorithms, anycast, services and policies", () => {
    const s = backbone();
    const plan = s.allocation.plan;
    expect(plan.nodes.length).toBeGreaterThanOrEqual(250);
    expect(plan.nodes.length).toBeLessThanOrEqual(320);
    expect(new Set(s.rows.map((r) => r.algorithm))).toEqual(new Set([0, 128]));
    expect(s.locators.filter((l) => l.owner.startsWith("anycast:")).length).toBeGreaterThan(0);
    const behaviors = new Set(s.rows.map((r) => r.behavior));
    for (const b of ["End.DT46", "End.DT4", "End.DT6", "End.DX4", "End.DX6", "End.DX2", "End.DX2V", "End.DT2U", "End.DT2M", "End.B6.Encaps", "End.B6.Encaps.Red"]) expect(behaviors.has(b), b).toBe(true);
    expect(plan.links.filter((l) => l.protection === "both").length).toBeGreaterThan(50);
  });

  it("is exactly what scripts/make-backbone.mjs writes", () => {
    const generated = execFileSync(process.execPath, [new URL("scripts/make-backbone.mjs", ROOT).pathname, "--stdout"], { encoding: "utf8" });
    expect(generated).toBe(readFileSync(new URL("sample-plans/tessaline-backbone.yaml", ROOT), "utf8"));
    expect(generated.split("\n")[0]).toMatch(/^# GENERATED by scripts\/make-backbone\.mjs/);
  });
});
