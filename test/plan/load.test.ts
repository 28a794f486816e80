/**
 * Plan loading: every bad plan gives located diagnostics with a stable code, the plan path and the
 * right line and column; JSON, CRLF and a byte-order mark load like plain YAML. Positions are
 * computed from the test text itself (the offset of the offending token), not copied from output.
 */
import { describe, expect, it } from "vitest";
import { stringify } from "yaml";
import type { Diagnostic } from "../../src/plan/diagnostic.js";
import { loadPlanBytes, loadPlanText } from "../../src/plan/load.js";
import type { Plan } from "../../src/plan/model.js";
import { alloc, basePlan, sidRows } from "../helpers/plans.js";

/** 1-based line and column of the `occurrence`-th appearance of `needle` in `text`. */
function posOf(text: string, needle: string, occurrence = 0): { line: number; column: number } {
  let at = -1;
  for (let i = 0; i <= occurrence; i++) {
    at = text.indexOf(needle, at + 1);
    if (at < 0) throw new Error(`test text has no ${JSON.stringify(needle)} #${occurrence}`);
  }
  const before = text.slice(0, at);
  const line = before.split("\n").length;
  return { line, column: at - (before.lastIndexOf("\n") + 1) + 1 };
}

function diagnosticsOf(text: string): Diagnostic[] {
  const r = loadPlanText(text, "bad.yaml");
  if (r.ok) throw new Error("expected the plan to be refused, but it loaded");
  return r.diagnostics;
}

const pathOf = (d: Diagnostic) => (d.location.path ?? []).join(".");

/** The single diagnostic at `path` (fails when there is none or several). */
function only(ds: readonly Diagnostic[], path: string): Diagnostic {
  const hits = ds.filter((d) => pathOf(d) === path);
  expect(hits.map((d) => `${d.code} ${pathOf(d)}`), ds.map((d) => `${d.code} ${pathOf(d)}: ${d.message}`).join("\n")).toHaveLength(1);
  return hits[0]!;
}

function loads(text: string): Plan {
  const r = loadPlanText(text, "good.yaml");
  if (!r.ok) throw new Error(r.diagnostics.map((d) => `${d.code} ${pathOf(d)}: ${d.message}`).join("\n"));
  return r.plan;
}

/** A one-level plan written out line by line, so that positions are known; `block` replaces the block entry. */
function plan(block: string, extra = "", levels = "  - { name: router, bits: 16 }"): string {
  return ["sidcarve: 1", "plan: t", "levels:", levels, "blocks:", block, "nodes:", "  - name: a", "  - name: b", extra].join("\n") + "\n";
}

describe("bit budget of a structure", () => {
  it("refuses block 48 + node 32 + function 32 + argument 32 = 144 bits", () => {
    // RFC 8986 §3.1: locator + function + argument must fit in 128 bits.
    const text = plan("  - name: wide\n    prefix: 5f00:0:100::/48\n    structure: { node: 32, function: 32, argument: 32 }", "", "  - { name: router, bits: 32 }");
    const ds = diagnosticsOf(text);
    const d = only(ds, "blocks.0.structure");
    expect(d.code).toBe("plan/structure");
    expect(d.message).toMatch(/\b144\b/);
    expect(d.message).toMatch(/\b128\b/);
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "structure:"));
    expect(ds).toHaveLength(1);
  });

  it("refuses LB 48 + LN 32 + F 32 + A 24 = 136 bits", () => {
    // RFC 9352 §9 / RFC 8986 §3.1: a 136-bit structure cannot be an IPv6 address.
    const ds = diagnosticsOf(plan("  - name: wide\n    prefix: 5f00:0:100::/48\n    structure: { node: 32, function: 32, argument: 24 }", "", "  - { name: router, bits: 32 }"));
    expect(only(ds, "blocks.0.structure").message).toMatch(/\b136\b/);
  });

  it("accepts exactly 128 bits (48 + 32 + 32 + 16)", () => {
    // RFC 8986 §3.1: L + F + A <= 128 is allowed, equality included.
    const p = loads(plan("  - name: full\n    prefix: 5f00:0:100::/48\n    structure: { node: 32, function: 32, argument: 16 }", "", "  - { name: router, bits: 32 }"));
    expect(p.blocks[0]!.layout).toMatchObject({ kind: "classic", blockBits: 48, nodeBits: 32, functionBits: 32, argumentBits: 16 });
  });

  it("refuses node bits that differ from the sum of the levels, naming both", () => {
    const ds = diagnosticsOf(plan("  - name: b\n    prefix: 5f00:0:100::/48\n    structure: { node: 20, function: 16 }"));
    const d = only(ds, "blocks.0");
    expect(d.code).toBe("plan/structure");
    expect(d.message).toMatch(/\b20\b/);
    expect(d.message).toMatch(/\b16\b/);
  });
});

describe("block prefixes", () => {
  it("reports host bits at the prefix value, with line and column", () => {
    const text = plan("  - name: b\n    prefix: 5f00:0:100::1/48\n    structure: { node: 16, function: 16 }");
    const d = only(diagnosticsOf(text), "blocks.0.prefix");
    expect(d.code).toBe("plan/host-bits");
    expect(d.location.file).toBe("bad.yaml");
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "5f00:0:100::1/48"));
    expect(d.location.line).toBe(7);
  });

  it("reports host bits in 2001:0DB8::CD30/60", () => {
    // RFC 4291 §2.3 lists 2001:0DB8::CD30/60 as not a legal form of 2001:db8:0:cd30::/60.
    const text = plan('  - name: b\n    prefix: "2001:0DB8::CD30/60"\n    structure: { node: 16, function: 16, argument: 0 }');
    expect(only(diagnosticsOf(text), "blocks.0.prefix").code).toBe("plan/host-bits");
  });

  it("reports a prefix that is not IPv6 text", () => {
    const text = plan("  - name: b\n    prefix: 5f00:0:100::/129\n    structure: { node: 16, function: 16 }");
    const d = only(diagnosticsOf(text), "blocks.0.prefix");
    expect(d.code).toBe("plan/prefix");
    expect(d.location.line).toBe(posOf(text, "5f00:0:100::/129").line);
  });
});

describe("compressed layouts (RFC 9800)", () => {
  const compressed = (c: string, levels = "  - { name: router, bits: 16 }") => plan(`  - name: c\n    prefix: 5f00:10::/32\n    compression: ${c}`, "", levels);

  it("accepts 16- and 32-bit C-SIDs", () => {
    // RFC 9800 §4.1 (NEXT-CSID, 16 MUST with a 32-bit block) and §4.2 (REPLACE-CSID, 32 MUST, 16 defined).
    expect(loads(compressed('{ flavor: next-csid, csid-bits: 16, global-pool: ["0x0100-0xbfff"], local-pool: ["0xc000-0xfeff"] }')).blocks[0]!.layout).toMatchObject({ csidBits: 16 });
    expect(loads(compressed('{ flavor: next-csid, csid-bits: 32, global-pool: ["0x100-0xbfffffff"], local-pool: ["0xc0000000-0xfeffffff"] }', "  - { name: router, bits: 32 }")).blocks[0]!.layout).toMatchObject({ csidBits: 32 });
  });

  it("refuses csid-bits 24", () => {
    // RFC 9800 §4.1/§4.2 define C-SID lengths of 16 and 32 bits only.
    const text = compressed('{ flavor: next-csid, csid-bits: 24, global-pool: ["0x000100-0xbfffff"], local-pool: ["0xc00000-0xfeffff"] }', "  - { name: router, bits: 24 }");
    const d = only(diagnosticsOf(text), "blocks.0.compression.csid-bits");
    expect(d.code).toBe("plan/structure");
    expect(d.message).toMatch(/\b24\b/);
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "24,"));
  });

  it("refuses a global pool that contains C-SID value 0", () => {
    // RFC 9800 §5: C-SID value 0 is reserved (it ends a container).
    const text = compressed('{ flavor: next-csid, csid-bits: 16, global-pool: ["0-0x0fff"], local-pool: ["0xc000-0xfeff"] }');
    const d = only(diagnosticsOf(text), "blocks.0.compression.global-pool.0");
    expect(d.code).toBe("plan/range");
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, '"0-0x0fff"'));
  });

  it("refuses a local pool that starts at 0x0000", () => {
    // RFC 9800 §5, as above: 0 is never a C-SID value, in either pool.
    const ds = diagnosticsOf(compressed('{ flavor: next-csid, csid-bits: 16, global-pool: ["0x0100-0xbfff"], local-pool: ["0xc000-0xfeff", "0x0000-0x00ff"] }'));
    expect(only(ds, "blocks.0.compression.local-pool.1").code).toBe("plan/range");
  });

  it("refuses a pool range that does not fit the C-SID", () => {
    const ds = diagnosticsOf(compressed('{ flavor: next-csid, csid-bits: 16, global-pool: ["0x0100-0x1ffff"], local-pool: ["0xc000-0xfeff"] }'));
    expect(only(ds, "blocks.0.compression.global-pool.0").code).toBe("plan/range");
  });

  it("refuses a two-C-SID layout without a local pool", () => {
    const ds = diagnosticsOf(compressed('{ flavor: next-csid, csid-bits: 16, global-pool: ["0x0100-0xbfff"] }'));
    expect(only(ds, "blocks.0.compression").code).toBe("plan/structure");
  });
});

describe("capacity of the levels", () => {
  it("refuses more nodes in a site than the router level holds, naming the level, capacity and demand", () => {
    // 2-bit router level with 0 reserved: 3 usable values, 4 routers asked for in north/quay.
    const obj = basePlan({
      levels: [
        { name: "region", bits: 4 },
        { name: "site", bits: 4 },
        { name: "router", bits: 2, reserved: [0] },
      ],
      blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 10, function: 16 } }],
      nodes: ["r1", "r2", "r3", "r4"].map((name) => ({ name, place: "north/quay" })),
      links: [],
    });
    const ds = loadPlanText(stringify(obj), "cap.yaml");
    expect(ds.ok).toBe(false);
    if (ds.ok) return;
    const d = only(ds.diagnostics, "nodes");
    expect(d.code).toBe("plan/capacity");
    expect(d.message).toMatch(/"router"/);
    expect(d.message).toMatch(/\b3\b/);
    expect(d.message).toMatch(/\b4\b/);
    expect(d.location.line).toBeGreaterThan(0);
  });

  it("accepts a site filled to the last usable value", () => {
    const obj = basePlan({
      levels: [
        { name: "region", bits: 4 },
        { name: "site", bits: 4 },
        { name: "router", bits: 2, reserved: [0] },
      ],
      blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 10, function: 16 } }],
      nodes: ["r1", "r2", "r3"].map((name) => ({ name, place: "north/quay" })),
      links: [],
    });
    expect(alloc(loads(stringify(obj))).table.nodes).toHaveLength(3);
  });

  it("refuses more regions than the first level holds", () => {
    // 1-bit region level: 2 values, 3 regions.
    const obj = basePlan({
      levels: [
        { name: "region", bits: 1 },
        { name: "site", bits: 4 },
        { name: "router", bits: 11 },
      ],
      groups: { north: { groups: { quay: {} } }, south: { groups: { dock: {} } }, east: { groups: { ford: {} } } },
      nodes: [{ name: "r1", place: "north/quay" }],
      links: [],
    });
    const r = loadPlanText(stringify(obj), "cap.yaml");
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const d = only(r.diagnostics, "groups");
    expect(d.code).toBe("plan/capacity");
    expect(d.message).toMatch(/"region"/);
    expect(d.message).toMatch(/\b2\b/);
    expect(d.message).toMatch(/\b3\b/);
  });

  it("counts an anycast group as a value of its site", () => {
    const obj = basePlan({
      levels: [
        { name: "region", bits: 4 },
        { name: "site", bits: 4 },
        { name: "router", bits: 2, reserved: [0] },
      ],
      blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 10, function: 16 } }],
      nodes: ["r1", "r2", "r3"].map((name) => ({ name, place: "north/quay" })),
      anycast: [{ name: "edge", place: "north/quay" }],
      links: [],
    });
    const r = loadPlanText(stringify(obj), "cap.yaml");
    expect(r.ok).toBe(false);
    if (!r.ok) expect(only(r.diagnostics, "nodes").code).toBe("plan/capacity");
  });
});

describe("schema errors", () => {
  const good = plan("  - name: blk\n    prefix: 5f00:0:100::/48\n    structure: { node: 16, function: 16 }");

  it("the reference plan loads", () => {
    expect(loads(good).nodes.map((n) => n.name)).toEqual(["a", "b"]);
  });

  it("names an unknown top-level key by its path and points at the key", () => {
    const text = good + "colour: red\n";
    const d = only(diagnosticsOf(text), "colour");
    expect(d.code).toBe("schema/additionalProperties");
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "colour"));
  });

  it("names an unknown key inside a node", () => {
    const text = good.replace("  - name: b\n", "  - name: b\n    rolle: pe\n");
    const d = only(diagnosticsOf(text), "nodes.1.rolle");
    expect(d.code).toBe("schema/additionalProperties");
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "rolle"));
  });

  it("points at the key of an unknown key whose value is a block mapping (not the line after)", () => {
    const text = plan("  - name: b\n    prefix: 5f00:0:100::/48\n    structure:\n      node: 16\n      function: 16\n      extra:\n        bits: 4");
    const d = only(diagnosticsOf(text), "blocks.0.structure.extra");
    expect(d.code).toBe("schema/additionalProperties");
    expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(text, "extra:"));
  });

  it("names a missing required key by the object that lacks it", () => {
    const text = plan("  - name: b\n    structure: { node: 16, function: 16 }");
    const d = only(diagnosticsOf(text), "blocks.0");
    expect(d.code).toBe("schema/required");
    expect(d.message).toMatch(/"prefix"/);
    expect(d.location.line).toBe(posOf(text, "  - name: b").line);
  });

  it("refuses a value of the wrong type", () => {
    const text = good.replace("bits: 16", 'bits: "sixteen"');
    const d = only(diagnosticsOf(text), "levels.0.bits");
    expect(d.code).toBe("schema/type");
    expect(d.location.line).toBe(posOf(text, '"sixteen"').line);
  });

  it("refuses a role outside the list", () => {
    const d = only(diagnosticsOf(good.replace("  - name: b\n", "  - { name: b, role: core }\n")), "nodes.1.role");
    expect(d.code).toBe("schema/enum");
  });
});

describe("references between objects", () => {
  const base = (extra: Record<string, unknown>) => stringify(basePlan({ links: [], ...extra }));

  it.each([
    ["a link end", { links: [{ ends: ["r1", "ghost"] }] }, "links.0.ends.1"],
    ["a VRF PE", { vrfs: [{ name: "v", pes: ["r1", "ghost"] }] }, "vrfs.0.pes.1"],
    ["a CE's PE", { vrfs: [{ name: "v", pes: ["r1"], ces: [{ name: "c", pe: "ghost", family: "ipv4" }] }] }, "vrfs.0.ces.0.pe"],
    ["an L2 attachment", { "l2-services": [{ name: "w", kind: "wire", attachments: [{ node: "ghost" }, { node: "r1" }] }] }, "l2-services.0.attachments.0.node"],
    ["a bridge node", { "l2-services": [{ name: "br", kind: "bridge", nodes: ["r1", "ghost"] }] }, "l2-services.0.nodes.1"],
    ["a policy headend", { policies: [{ name: "p", node: "ghost" }] }, "policies.0.node"],
    ["a table node", { tables: [{ name: "t", nodes: ["ghost"] }] }, "tables.0.nodes.0"],
  ])("refuses %s that is not a node", (_what, extra, path) => {
    const text = base(extra);
    const d = only(diagnosticsOf(text), path);
    expect(d.code).toBe("plan/reference");
    expect(d.location.line).toBe(posOf(text, "ghost").line);
  });

  it("refuses a node in a place that is not a site of the plan", () => {
    const text = base({ nodes: [{ name: "r1", place: "north/nowhere" }] });
    const d = only(diagnosticsOf(text), "nodes.0.place");
    expect(d.code).toBe("plan/reference");
    expect(d.location.line).toBe(posOf(text, "north/nowhere").line);
  });

  it("refuses membership of an undeclared anycast group", () => {
    const d = only(diagnosticsOf(base({ nodes: [{ name: "r1", place: "north/quay", anycast: ["edge"] }] })), "nodes.0.anycast.0");
    expect(d.code).toBe("plan/reference");
  });

  it("refuses a VRF on an undeclared algorithm", () => {
    const d = only(diagnosticsOf(base({ vrfs: [{ name: "v", pes: ["r1"], algorithm: 128 }] })), "vrfs.0.algorithm");
    expect(d.code).toBe("plan/reference");
  });

  it("refuses two end-sids entries with the same flavour set, in any order, at the second", () => {
    // one SID listed twice: the lock could hold only one value for both
    const text = base({ "end-sids": [{ flavors: [] }, { flavors: ["PSP", "USD"] }, { flavors: ["USD", "PSP"] }] });
    const d = only(diagnosticsOf(text), "end-sids.2.flavors");
    expect(d.code).toBe("plan/duplicate");
    expect(d.message).toContain('"PSP+USD"');
    expect(loadPlanText(base({ "end-sids": [{ flavors: [] }, { flavors: ["PSP"] }, { flavors: ["PSP", "USD"] }] }), "ok.yaml").ok).toBe(true);
  });

  // Names that key SIDs in the lock: a repeat would give one node two SIDs under one key (found
  // when two VRFs named alike were accepted without a word).
  it.each([
    ["two VRFs of one name", { vrfs: [{ name: "v", pes: ["r1"], families: ["ipv4"] }, { name: "v", pes: ["r1"], families: ["ipv4"] }] }, "vrfs.1.name", '"v"'],
    ["two CEs of one name in a VRF", { vrfs: [{ name: "v", pes: ["r1"], ces: [{ name: "c", pe: "r1", family: "ipv4" }, { name: "c", pe: "r1", family: "ipv6" }] }] }, "vrfs.0.ces.1.name", '"c"'],
    ["two L2 services of one name", { "l2-services": [{ name: "w", kind: "wire", attachments: [{ node: "r1", interface: "e1" }] }, { name: "w", kind: "bridge", nodes: ["r1"] }] }, "l2-services.1.name", '"w"'],
    ["one attachment circuit twice", { "l2-services": [{ name: "w", kind: "vlan-wire", attachments: [{ node: "r1", interface: "e1", vlan: 7 }, { node: "r1", interface: "e1", vlan: 7 }] }] }, "l2-services.0.attachments.1", "VLAN 7"],
    ["two policies of one name on a headend", { policies: [{ name: "p", node: "r1" }, { name: "p", node: "r1", behavior: "End.B6.Encaps.Red" }] }, "policies.1.name", '"p"'],
    ["two tables of one name", { tables: [{ name: "t", nodes: ["r1"] }, { name: "t", nodes: ["r1"] }] }, "tables.1.name", '"t"'],
    ["two anycast groups of one name", { anycast: [{ name: "edge", place: "north/quay" }, { name: "edge", place: "south/dock" }] }, "anycast.1.name", '"edge"'],
  ])("refuses %s, at the second", (_what, extra, path, quoted) => {
    const d = only(diagnosticsOf(base(extra)), path);
    expect(d.code).toBe("plan/duplicate");
    expect(d.message).toContain(quoted);
    expect(d.message).toContain("first as");
  });

  // Two blocks that share addresses would give two nodes one locator: found as hundreds of
  // duplicate SIDs in lint before; now one error at the second block.
  it.each([
    ["the same prefix", "5f00:0:100::/48", "5f00:0:100::/48"],
    ["a prefix inside the first", "5f00:0:100::/48", "5f00:0:100:8000::/56"],
    ["a prefix around the first", "5f00:0:100::/48", "5f00::/32"],
  ])("refuses a second block with %s", (_what, first, second) => {
    const st = { node: 16, function: 16, argument: 0 };
    const text = base({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "a", prefix: first, structure: st }, { name: "z", prefix: second, algorithms: [128], structure: st }] });
    const d = only(diagnosticsOf(text), "blocks.1.prefix");
    expect(d.code).toBe("plan/block-overlap");
    expect(d.message).toContain(`block "z" (${second}) overlaps block "a" (${first})`);
  });

  it("accepts blocks side by side", () => {
    const st = { node: 16, function: 16, argument: 0 };
    const text = base({ algorithms: [{ id: 0 }, { id: 128 }], blocks: [{ name: "a", prefix: "5f00:0:100::/48", structure: st }, { name: "z", prefix: "5f00:0:101::/48", algorithms: [128], structure: st }] });
    expect(loadPlanText(text, "ok.yaml").ok).toBe(true);
  });

  it("accepts the same names where they do not share a key", () => {
    // one CE name in two VRFs, one policy name on two headends, one circuit on two VLANs
    const text = base({
      nodes: [{ name: "r1", place: "north/quay" }, { name: "r2", place: "south/dock" }],
      vrfs: [{ name: "v", pes: ["r1"], ces: [{ name: "c", pe: "r1", family: "ipv4" }] }, { name: "w", pes: ["r1"], ces: [{ name: "c", pe: "r1", family: "ipv4" }] }],
      "l2-services": [{ name: "q", kind: "vlan-wire", attachments: [{ node: "r1", interface: "e1", vlan: 7 }, { node: "r1", interface: "e1", vlan: 8 }] }],
      policies: [{ name: "p", node: "r1" }, { name: "p", node: "r2" }],
    });
    expect(loadPlanText(text, "ok.yaml").ok).toBe(true);
  });

  it("refuses a duplicate node name at the second occurrence", () => {
    const d = only(diagnosticsOf(base({ nodes: [{ name: "r1", place: "north/quay" }, { name: "r1", place: "south/dock" }] })), "nodes.1.name");
    expect(d.code).toBe("plan/duplicate");
  });
});

describe("YAML reading", () => {
  const pre = plan("  - { name: b, prefix: 5f00:0:100::/48, structure: { node: 16, function: 16 } }").replace(/nodes:\n[\s\S]*$/, "");

  it("reports a duplicate key at the second key", () => {
    const text = plan("  - name: b\n    prefix: 5f00:0:100::/48\n    structure: { node: 16, function: 16 }\n    prefix: 5f00:0:200::/48");
    const ds = diagnosticsOf(text);
    expect(ds.map((d) => d.code)).toEqual(["yaml/duplicate-key"]);
    expect({ line: ds[0]!.location.line, column: ds[0]!.location.column }).toEqual(posOf(text, "prefix", 1));
  });

  it("reports a duplicate key in a JSON plan", () => {
    const text = '{\n  "sidcarve": 1,\n  "plan": "t",\n  "plan": "u",\n  "levels": [ { "name": "router", "bits": 16 } ]\n}\n';
    const ds = diagnosticsOf(text);
    expect(ds.map((d) => d.code)).toEqual(["yaml/duplicate-key"]);
    expect(ds[0]!.location.line).toBe(4);
  });

  it("reports a stray closing bracket at its line and column", () => {
    const text = pre + "nodes:\n  - name: a\n  - name: b\n  ]\n";
    const ds = diagnosticsOf(text);
    expect(ds[0]!.code).toBe("yaml/syntax");
    expect({ line: ds[0]!.location.line, column: ds[0]!.location.column }).toEqual(posOf(text, "]"));
  });

  it("reports a value that starts with a reserved character at that character", () => {
    const text = pre + "nodes:\n  - name: a\n  - name: @b\n";
    const ds = diagnosticsOf(text);
    expect(ds[0]!.code).toBe("yaml/syntax");
    expect({ line: ds[0]!.location.line, column: ds[0]!.location.column }).toEqual(posOf(text, "@b"));
  });

  it("reports a tab used as indentation on its line", () => {
    const text = pre + "nodes:\n  - name: a\n\t- name: b\n";
    const ds = diagnosticsOf(text);
    expect(ds.every((d) => d.code === "yaml/syntax")).toBe(true);
    expect(ds[0]!.location.line).toBe(posOf(text, "\t").line);
  });

  it("reports a nested mapping in a compact mapping on its line", () => {
    const text = pre + "nodes:\n  - name: a\n  - name: b: c\n";
    const ds = diagnosticsOf(text);
    expect(ds[0]!.code).toBe("yaml/syntax");
    expect(ds[0]!.location.line).toBe(posOf(text, "b: c").line);
  });

  it("reports a missing comma in a JSON plan on the line where the next item starts", () => {
    const text = '{\n  "sidcarve": 1,\n  "plan": "t"\n  "levels": []\n}\n';
    const ds = diagnosticsOf(text);
    expect(ds[0]!.code).toBe("yaml/syntax");
    expect(ds[0]!.location.line).toBe(posOf(text, '"levels"').line);
  });

  it("refuses an empty file and a list at the top", () => {
    expect(diagnosticsOf("\n\n").map((d) => d.code)).toEqual(["input/empty"]);
    expect(diagnosticsOf("- a\n- b\n").map((d) => d.code)).toEqual(["schema/type"]);
  });

  it("refuses bytes that are not UTF-8, naming the line", () => {
    const bytes = Buffer.concat([Buffer.from("sidcarve: 1\nplan: t\noperator: "), Buffer.from([0xc3, 0x28]), Buffer.from("\n")]);
    const r = loadPlanBytes(bytes, "latin.yaml");
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.diagnostics.map((d) => d.code)).toEqual(["input/encoding"]);
      expect(r.diagnostics[0]!.location.line).toBe(3);
    }
  });
});

describe("JSON, CRLF and a byte-order mark", () => {
  const rich = basePlan({
    algorithms: [{ id: 0 }, { id: 128, name: "low-latency" }],
    blocks: [
      { name: "b", prefix: "5f00:0:100::/48", algorithms: [0], structure: { node: 16, function: 16, argument: 8 } },
      { name: "fa", prefix: "5f00:0:101::/48", algorithms: [128], structure: { node: 16, function: 16 } },
    ],
    links: [{ ends: [{ node: "r1", interface: "e1" }, { node: "r2", interface: "w1" }], protection: "both" }, { ends: ["r2", "r3"] }],
    vrfs: [{ name: "blue", pes: ["r1", "r4"], mode: "split" }],
    "l2-services": [{ name: "br", kind: "bridge", nodes: ["r1", "r4"] }],
  });
  const yamlText = stringify(rich);
  const strip = (p: Plan) => {
    const { locate: _l, file: _f, ...rest } = p;
    return rest;
  };

  it("a JSON plan loads to the same model and the same SIDs as its YAML form", () => {
    const y = loads(yamlText);
    const j = loadPlanText(JSON.stringify(rich, null, 2), "plan.json");
    expect(j.ok).toBe(true);
    if (!j.ok) return;
    expect(strip(j.plan)).toEqual(strip(y));
    expect(sidRows(alloc(j.plan))).toEqual(sidRows(alloc(y)));
  });

  it("JSON diagnostics carry line numbers too", () => {
    const json = JSON.stringify({ ...rich, colour: "red" }, null, 2);
    const r = loadPlanText(json, "plan.json");
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const d = only(r.diagnostics, "colour");
      expect(d.code).toBe("schema/additionalProperties");
      expect({ line: d.location.line, column: d.location.column }).toEqual(posOf(json, '"colour"'));
    }
  });

  it("CRLF line ends and a leading BOM load the same as LF", () => {
    const bytes = Buffer.from("\ufeff" + yamlText.replace(/\n/g, "\r\n"), "utf8");
    expect(bytes.subarray(0, 3)).toEqual(Buffer.from([0xef, 0xbb, 0xbf]));
    const r = loadPlanBytes(bytes, "crlf.yaml");
    expect(r.ok).toBe(true);
    if (r.ok) expect(strip(r.plan)).toEqual(strip(loads(yamlText)));
  });

  it("CRLF does not shift line or column of a diagnostic", () => {
    const text = plan("  - name: b\n    prefix: 5f00:0:100::1/48\n    structure: { node: 16, function: 16 }");
    const lf = only(diagnosticsOf(text), "blocks.0.prefix").location;
    const r = loadPlanBytes(Buffer.from("\ufeff" + text.replace(/\n/g, "\r\n"), "utf8"), "bad.yaml");
    expect(r.ok).toBe(false);
    if (!r.ok) {
      const crlf = only(r.diagnostics, "blocks.0.prefix").location;
      expect([crlf.line, crlf.column]).toEqual([lf.line, lf.column]);
      expect([crlf.line, crlf.column]).toEqual([posOf(text, "5f00:0:100::1/48").line, posOf(text, "5f00:0:100::1/48").column]);
    }
  });
});
