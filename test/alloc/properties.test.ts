/**
 * Property tests of the allocator on random valid plans (random level widths and orders, numbers of
 * regions, sites and routers within capacity, random links, VRFs, L2 services, binding policies,
 * anycast, classic and NEXT-CSID layouts, Flex-Algo by algorithm bits or by a block of its own):
 * locators never overlap except where anycast shares one, every SID lies in its locator with a
 * structure of at most 128 bits, SIDs are unique, allocation is idempotent, growth moves nothing,
 * and removed values are never handed out again. Fixed seeds keep every run the same.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { stringify } from "yaml";
import { type Allocation, allocate } from "../../src/alloc/allocate.js";
import { type Lock, parseLock, parseLockReadable, serializeLock } from "../../src/alloc/lock.js";
import { csvByteChunks, csvPackedChunks, tableToCsv } from "../../src/emit/csv.js";
import { jsonChunks, tableToJson } from "../../src/emit/json.js";
import { Prefix } from "../../src/net/prefix.js";
import { getField } from "../../src/net/uint128.js";
import { formatDiagnostic } from "../../src/plan/diagnostic.js";
import { loadPlanText } from "../../src/plan/load.js";
import type { Plan } from "../../src/plan/model.js";

type Order = "sequential" | "leftmost" | "centremost" | "rightmost";
const ORDERS: readonly Order[] = ["sequential", "leftmost", "centremost", "rightmost"];
const PROTECTIONS = ["unprotected", "protected", "both"] as const;
const POLICY_BEHAVIORS = ["End.B6.Encaps", "End.B6.Encaps.Red", "End.BM"] as const;

/** The random choices a plan is built from; every index is taken modulo the list it points into. */
interface Spec {
  readonly kind: "classic" | "next-csid";
  readonly levelCount: 1 | 2 | 3;
  readonly topBits: number;
  readonly siteBits: number;
  readonly routerBits: number;
  readonly orders: readonly [Order, Order, Order];
  readonly reserveZero: readonly [boolean, boolean, boolean];
  readonly functionBits: number;
  readonly argumentBits: number;
  readonly blockLen: number;
  readonly blockRandom: bigint;
  readonly gibLast: number;
  readonly flex: "none" | "bits" | "block";
  readonly shape: readonly (readonly number[])[];
  readonly defaultOnly: readonly boolean[];
  readonly links: readonly (readonly [number, number, number])[];
  readonly vrfs: readonly { pes: readonly number[]; families: number; split: boolean; flex: boolean; ces: readonly (readonly [number, boolean])[] }[];
  readonly wires: readonly (readonly [number, number])[];
  readonly bridge: readonly number[];
  readonly policies: readonly (readonly [number, number])[];
  readonly anycast: boolean;
  readonly twoEnds: boolean;
  readonly adjPsp: boolean;
}

/** Extra items for the growth and removal properties. */
interface Change {
  readonly newNodes: readonly number[]; // place indices
  readonly newLinks: readonly (readonly [number, number, number])[];
  readonly newVrfPes: readonly number[];
  readonly removeNodes: readonly number[];
  readonly removeLinks: readonly number[];
}

const order = fc.constantFrom(...ORDERS);
const specArb: fc.Arbitrary<Spec> = fc
  .record({
    kind: fc.constantFrom("classic" as const, "next-csid" as const),
    levelCount: fc.constantFrom(1 as const, 2 as const, 3 as const),
    topBits: fc.integer({ min: 2, max: 5 }),
    siteBits: fc.integer({ min: 2, max: 4 }),
    routerBits: fc.integer({ min: 4, max: 8 }),
    orders: fc.tuple(order, order, order),
    reserveZero: fc.tuple(fc.boolean(), fc.boolean(), fc.boolean()),
    functionBits: fc.integer({ min: 10, max: 16 }),
    argumentBits: fc.integer({ min: 0, max: 8 }),
    blockLen: fc.integer({ min: 24, max: 64 }),
    blockRandom: fc.bigInt({ min: 0n, max: (1n << 48n) - 1n }),
    gibLast: fc.integer({ min: 0x8000, max: 0xefff }),
    flex: fc.constantFrom("none" as const, "bits" as const, "block" as const),
    shape: fc.array(fc.array(fc.integer({ min: 1, max: 4 }), { minLength: 1, maxLength: 3 }), { minLength: 1, maxLength: 3 }),
    defaultOnly: fc.array(fc.boolean(), { minLength: 40, maxLength: 40 }),
    links: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.nat({ max: 2 })), { maxLength: 14 }),
    vrfs: fc.array(
      fc.record({
        pes: fc.array(fc.nat(), { minLength: 1, maxLength: 4 }),
        families: fc.integer({ min: 1, max: 3 }),
        split: fc.boolean(),
        flex: fc.boolean(),
        ces: fc.array(fc.tuple(fc.nat(), fc.boolean()), { maxLength: 2 }),
      }),
      { maxLength: 3 },
    ),
    wires: fc.array(fc.tuple(fc.nat(), fc.nat()), { maxLength: 2 }),
    bridge: fc.array(fc.nat(), { maxLength: 3 }),
    policies: fc.array(fc.tuple(fc.nat(), fc.nat({ max: 2 })), { maxLength: 2 }),
    anycast: fc.boolean(),
    twoEnds: fc.boolean(),
    adjPsp: fc.boolean(),
  })
  .map((s) => s as Spec);

const changeArb: fc.Arbitrary<Change> = fc.record({
  newNodes: fc.array(fc.nat(), { minLength: 1, maxLength: 3 }),
  newLinks: fc.array(fc.tuple(fc.nat(), fc.nat(), fc.nat({ max: 2 })), { minLength: 1, maxLength: 4 }),
  newVrfPes: fc.array(fc.nat(), { minLength: 1, maxLength: 3 }),
  removeNodes: fc.array(fc.nat(), { minLength: 1, maxLength: 2 }),
  removeLinks: fc.array(fc.nat(), { maxLength: 3 }),
});

// ---- a plan as plain lists of names, so that items can be added and removed

interface NodeItem {
  name: string;
  place: string;
  defaultOnly: boolean;
  anycast: boolean;
}
interface Model {
  header: Record<string, unknown>;
  flex: boolean;
  places: string[];
  anycastPlace: string | undefined;
  nodes: NodeItem[];
  links: { a: string; b: string; protection: string }[];
  vrfs: { name: string; pes: string[]; families: string[]; mode: string; algorithm: number; ces: { name: string; pe: string; family: string }[] }[];
  wires: { name: string; ends: string[] }[];
  bridge: string[];
  policies: { name: string; node: string; behavior: string }[];
}

function buildModel(s: Spec): Model {
  const next = s.kind === "next-csid";
  const flex = next ? (s.flex === "none" ? "none" : "block") : s.flex;
  // Level widths. NEXT-CSID: the levels fill one 16-bit C-SID. The top level gets at most half its
  // values: with the GIB reaching at least 0x8000, that many top values can always hold node C-SIDs
  // (the allocator has to skip the ones that cannot, whatever the order).
  let widths: number[];
  if (next) widths = s.levelCount === 1 ? [16] : s.levelCount === 2 ? [s.topBits + 1, 15 - s.topBits] : [s.topBits, s.siteBits, 16 - s.topBits - s.siteBits];
  else widths = s.levelCount === 1 ? [s.routerBits + 2] : s.levelCount === 2 ? [s.topBits, s.routerBits] : [s.topBits, s.siteBits, s.routerBits];
  const names = s.levelCount === 1 ? ["router"] : s.levelCount === 2 ? ["site", "router"] : ["region", "site", "router"];
  const levels = widths.map((bits, i) => {
    const top = i === 0;
    return { name: names[i], bits, order: s.orders[i]!, ...(s.reserveZero[i] ? { reserved: [0] } : {}) };
  });
  const topCap = (next ? 2 ** (widths[0]! - 1) : 2 ** widths[0]!) - (levels[0]!.reserved ? 1 : 0);

  // Places and their router counts.
  const places: { path: string; count: number }[] = [];
  const groups: Record<string, unknown> = {};
  if (s.levelCount === 3) {
    s.shape.slice(0, Math.floor(topCap)).forEach((sites, r) => {
      const kids: Record<string, unknown> = {};
      sites.forEach((count, k) => {
        kids[`s${k}`] = {};
        places.push({ path: `r${r}/s${k}`, count });
      });
      groups[`r${r}`] = { groups: kids };
    });
  } else if (s.levelCount === 2) {
    s.shape.flat().slice(0, Math.min(4, Math.floor(topCap))).forEach((count, k) => {
      groups[`s${k}`] = {};
      places.push({ path: `s${k}`, count });
    });
  } else places.push({ path: "", count: s.shape.flat().reduce((a, b) => a + b, 0) });

  // NEXT-CSID with groups: end the GIB on a top-level boundary, so that a top value is either wholly
  // inside the GIB or wholly outside it (a value half inside would leave its sites short of room).
  const unit = 2 ** (16 - widths[0]!);
  const gibLast = next && s.levelCount > 1 ? Math.floor((s.gibLast + 1) / unit) * unit - 1 : s.gibLast;
  const nodeBits = widths.reduce((a, b) => a + b, 0) + (flex === "bits" ? 1 : 0);
  const base = (0x5f00n << 112n) | ((s.blockRandom & ((1n << BigInt(s.blockLen - 17)) - 1n)) << BigInt(128 - s.blockLen));
  const second = base | (1n << 111n); // differs from the first block in bit 16: the two never overlap
  const layout = next
    ? { compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": [`0x0001-0x${gibLast.toString(16)}`], "local-pool": [`0x${(gibLast + 1).toString(16)}-0xffff`], argument: s.argumentBits } }
    : { structure: { node: nodeBits, function: s.functionBits, argument: s.argumentBits } };
  const blocks =
    flex === "block"
      ? [
          { name: "base", prefix: new Prefix(base, s.blockLen).format(), algorithms: [0], ...layout },
          { name: "fa", prefix: new Prefix(second, s.blockLen).format(), algorithms: [128], ...layout },
        ]
      : [{ name: "base", prefix: new Prefix(base, s.blockLen).format(), algorithms: flex === "bits" ? [0, 128] : [0], ...layout }];

  const header: Record<string, unknown> = {
    sidcarve: 1,
    plan: "prop",
    algorithms: flex === "none" ? [{ id: 0 }] : [{ id: 0 }, { id: 128 }],
    levels,
    blocks,
    ...(s.levelCount > 1 ? { groups } : {}),
    "end-sids": s.twoEnds ? [{ flavors: [] }, { flavors: ["PSP", "USD"] }] : [{ flavors: [] }],
    ...(s.adjPsp ? { "adjacency-flavors": ["PSP"] } : {}),
  };

  const nodes: NodeItem[] = [];
  for (const p of places) for (let k = 0; k < p.count; k++) nodes.push({ name: `n${nodes.length}`, place: p.path, defaultOnly: flex !== "none" && s.defaultOnly[nodes.length % 40]!, anycast: false });
  const firstPlace = places[0]!.path;
  const inFirst = nodes.filter((n) => n.place === firstPlace);
  let anycastPlace: string | undefined;
  if (s.anycast && inFirst.length >= 2) {
    anycastPlace = firstPlace;
    inFirst[0]!.anycast = true;
    inFirst[1]!.anycast = true;
  }
  const pick = (i: number) => nodes[i % nodes.length]!.name;
  const m: Model = { header, flex: flex !== "none", places: places.map((p) => p.path), anycastPlace, nodes, links: [], vrfs: [], wires: [], bridge: [], policies: [] };
  for (const [a, b, p] of s.links) addLink(m, pick(a), pick(b), PROTECTIONS[p]!);
  s.vrfs.forEach((v, i) => {
    // a VRF carried over Flex-Algo 128 may only sit on PEs that run algorithm 128
    const flexVrf = v.flex && m.flex && nodes.some((n) => !n.defaultOnly);
    const candidates = flexVrf ? nodes.filter((n) => !n.defaultOnly) : nodes;
    const pes = [...new Set(v.pes.map((x) => candidates[x % candidates.length]!.name))];
    const families = v.families === 1 ? ["ipv4"] : v.families === 2 ? ["ipv6"] : ["ipv4", "ipv6"];
    const ces = v.ces.map(([pe, v6], j) => ({ name: `ce${i}-${j}`, pe: pes[pe % pes.length]!, family: v6 ? "ipv6" : "ipv4" }));
    m.vrfs.push({ name: `vrf${i}`, pes, families, mode: v.split ? "split" : "combined", algorithm: flexVrf ? 128 : 0, ces });
  });
  s.wires.forEach(([a, b], i) => m.wires.push({ name: `wire${i}`, ends: [pick(a), pick(b)] }));
  m.bridge.push(...new Set(s.bridge.map(pick)));
  s.policies.forEach(([n, b], i) => m.policies.push({ name: `pol${i}`, node: pick(n), behavior: POLICY_BEHAVIORS[b]! }));
  return m;
}

function addLink(m: Model, a: string, b: string, protection: string): void {
  if (a === b) return;
  if (m.links.some((l) => (l.a === a && l.b === b) || (l.a === b && l.b === a))) return;
  m.links.push({ a, b, protection });
}

function toPlanObject(m: Model): Record<string, unknown> {
  const single = m.places.length === 1 && m.places[0] === "";
  return {
    ...m.header,
    ...(m.anycastPlace !== undefined ? { anycast: [{ name: "edge", ...(single ? {} : { place: m.anycastPlace }) }] } : {}),
    nodes: m.nodes.map((n) => ({
      name: n.name,
      ...(single ? {} : { place: n.place }),
      ...(n.defaultOnly ? { algorithms: [0] } : {}),
      ...(n.anycast ? { anycast: ["edge"] } : {}),
    })),
    links: m.links.map((l) => ({ ends: [l.a, l.b], protection: l.protection })),
    vrfs: m.vrfs.map((v) => ({ name: v.name, pes: v.pes, families: v.families, mode: v.mode, algorithm: v.algorithm, ...(v.ces.length ? { ces: v.ces } : {}) })),
    "l2-services": [
      ...m.wires.map((w) => ({ name: w.name, kind: "wire", attachments: w.ends.map((node, i) => ({ node, interface: `ac${i}` })) })),
      ...(m.bridge.length ? [{ name: "lan", kind: "bridge", nodes: m.bridge }] : []),
    ],
    policies: m.policies,
  };
}

function clone(m: Model): Model {
  return structuredClone(m);
}

/** The model with the given nodes gone, and everything that referred to them. */
function withoutNodes(m: Model, names: ReadonlySet<string>): Model {
  const c = clone(m);
  c.nodes = c.nodes.filter((n) => !names.has(n.name));
  c.links = c.links.filter((l) => !names.has(l.a) && !names.has(l.b));
  c.vrfs = c.vrfs
    .map((v) => ({ ...v, pes: v.pes.filter((p) => !names.has(p)), ces: v.ces.filter((x) => !names.has(x.pe)) }))
    .filter((v) => v.pes.length > 0);
  c.wires = c.wires.map((w) => ({ ...w, ends: w.ends.filter((e) => !names.has(e)) })).filter((w) => w.ends.length > 0);
  c.bridge = c.bridge.filter((b) => !names.has(b));
  c.policies = c.policies.filter((p) => !names.has(p.node));
  return c;
}

/** The model with new nodes (in existing places), new links and a new VRF. */
function grown(m: Model, ch: Change, tag: string): Model {
  const c = clone(m);
  ch.newNodes.forEach((p, i) => c.nodes.push({ name: `${tag}${i}`, place: c.places[p % c.places.length]!, defaultOnly: false, anycast: false }));
  const pick = (i: number) => c.nodes[i % c.nodes.length]!.name;
  for (const [a, b, p] of ch.newLinks) addLink(c, pick(a), pick(b), PROTECTIONS[p]!);
  c.vrfs.push({ name: `${tag}-vrf`, pes: [...new Set(ch.newVrfPes.map(pick))], families: ["ipv4", "ipv6"], mode: "combined", algorithm: 0, ces: [] });
  return c;
}

// ---- allocation helpers

function load(m: Model): Plan {
  const r = loadPlanText(stringify(toPlanObject(m)), "prop.yaml");
  if (!r.ok) throw new Error(`generated plan does not load:\n${r.diagnostics.map(formatDiagnostic).join("\n")}\n${stringify(toPlanObject(m))}`);
  return r.plan;
}

function run(plan: Plan, lock?: Lock): Allocation {
  const r = allocate(plan, lock);
  if (!r.ok) throw new Error([...r.diagnostics.map(formatDiagnostic), ...r.moves.map((x) => `${x.what}: ${x.from} -> ${x.to} (${x.reason})`)].join("\n"));
  return r.allocation;
}

/** The lock as the CLI would read it back from disk. */
function reread(a: Allocation): Lock {
  const r = parseLock(serializeLock(a.lock), "prop.lock.json", a.plan.name);
  if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.lock;
}

const rowsOf = (a: Allocation) => a.table.nodes.flatMap((n) => n.sids.map((s) => `${n.node} ${s.key} ${s.sid.toString(16)}`));
/** SID address -> "owner key" of every row holding it (owner: the node, or the anycast group). */
function holders(a: Allocation): Map<bigint, Set<string>> {
  const out = new Map<bigint, Set<string>>();
  for (const n of a.table.nodes) {
    for (const s of n.sids) {
      const any = n.locators.find((l) => s.locator && l.prefix.equals(s.locator))?.anycast;
      const h = `${any ? `anycast:${any}` : n.node} ${s.key}`;
      if (!out.has(s.sid)) out.set(s.sid, new Set());
      out.get(s.sid)!.add(h);
    }
  }
  return out;
}
const addressesOf = (a: Allocation) => new Set(a.table.nodes.flatMap((n) => n.sids.map((s) => s.sid)));

/** Every structural invariant of one allocation; returns the violations found (empty when sound). */
function violations(a: Allocation): string[] {
  const out: string[] = [];
  // Locators: one owner each (a node, or an anycast group shared by its members), pairwise disjoint.
  const owners = new Map<string, { owner: string; prefix: Prefix }>();
  for (const n of a.table.nodes) {
    for (const l of n.locators) {
      const owner = l.anycast ? `anycast:${l.anycast}` : n.node;
      const k = l.prefix.format();
      const had = owners.get(k);
      if (had && had.owner !== owner) out.push(`locator ${k} held by ${had.owner} and ${owner}`);
      if (!had) owners.set(k, { owner, prefix: l.prefix });
    }
  }
  const locs = [...owners.values()];
  for (let i = 0; i < locs.length; i++) {
    for (let j = i + 1; j < locs.length; j++) {
      if (locs[i]!.prefix.overlaps(locs[j]!.prefix)) out.push(`locators of ${locs[i]!.owner} and ${locs[j]!.owner} overlap`);
    }
  }
  // SIDs: inside a locator of their node, structure within 128 bits, one owner per address.
  const sidOwner = new Map<bigint, string>();
  for (const n of a.table.nodes) {
    for (const s of n.sids) {
      const loc = s.locator ? n.locators.find((l) => l.prefix.equals(s.locator!)) : undefined;
      if (!loc) {
        out.push(`${n.node} ${s.key}: its locator is not one of the node's`);
        continue;
      }
      if (!loc.prefix.contains(s.sid)) out.push(`${n.node} ${s.key}: SID outside its locator`);
      const st = s.structure!;
      if (st.block + st.node + st.function + st.argument > 128) out.push(`${n.node} ${s.key}: structure over 128 bits`); // RFC 8986 §3.1
      if (st.block + st.node !== loc.prefix.len) out.push(`${n.node} ${s.key}: structure block+node differs from the locator length`);
      const block = a.plan.blocks.find((b) => b.prefix.contains(s.sid));
      if (block?.layout.kind === "compressed") {
        // RFC 9800 §5: the node C-SID comes from the GIB (never 0), a local function C-SID from the LIB.
        const L = block.layout;
        const inPool = (v: bigint, pool: readonly { first: bigint; last: bigint }[]) => v !== 0n && pool.some((r) => v >= r.first && v <= r.last);
        if (!inPool(getField(s.sid, L.blockBits, L.nodeBits), L.gib)) out.push(`${n.node} ${s.key}: node C-SID outside the GIB`);
        if (st.function > 0 && !inPool(getField(s.sid, L.blockBits + L.nodeBits, L.functionBits), L.lib)) out.push(`${n.node} ${s.key}: function C-SID outside the LIB`);
      }
      const owner = loc.anycast ? `anycast:${loc.anycast}` : n.node;
      const had = sidOwner.get(s.sid);
      if (had !== undefined && had !== owner) out.push(`SID ${s.sid.toString(16)} held by ${had} and ${owner}`);
      sidOwner.set(s.sid, owner);
    }
    const seen = new Set<bigint>();
    for (const s of n.sids) {
      if (seen.has(s.sid)) out.push(`${n.node}: SID ${s.sid.toString(16)} twice`);
      seen.add(s.sid);
    }
  }
  return out;
}

const FC = { numRuns: 60, endOnFailure: true } as const;

describe("regression examples", () => {
  it("skips a region value whose node C-SIDs would all fall outside the GIB", () => {
    // RFC 3531 leftmost order for 4 bits: 0000 (reserved here), 1000, 0100, 1100, 0010. With the GIB
    // at 0x0100-0xbfff, region 0xc would put every node C-SID at 0xc000 or above (RFC 9800 §5).
    const r = loadPlanText(
      stringify({
        sidcarve: 1,
        plan: "prop",
        levels: [{ name: "region", bits: 4, order: "leftmost", reserved: [0] }, { name: "router", bits: 12 }],
        blocks: [{ name: "b", prefix: "5f00:1::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0100-0xbfff"], "local-pool": ["0xc000-0xfeff"] } }],
        groups: { a: {}, b: {}, c: {} },
        nodes: [{ name: "x", place: "a" }, { name: "y", place: "b" }, { name: "z", place: "c" }],
      }),
      "gib.yaml",
    );
    if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
    const a = run(r.plan);
    expect(["a", "b", "c"].map((g) => a.groupValues.get(g))).toEqual([8n, 4n, 2n]);
    expect(violations(a)).toEqual([]);
  });

  const plan = (nodes: string[], links: [string, string][], wires: string[][]) =>
    loadPlanText(
      stringify({
        sidcarve: 1,
        plan: "prop",
        levels: [{ name: "site", bits: 4 }, { name: "router", bits: 8, reserved: [0] }],
        blocks: [{ name: "b", prefix: "5f00:0:700::/48", structure: { node: 12, function: 16 } }],
        groups: { quay: {} },
        nodes: nodes.map((name) => ({ name, place: "quay" })),
        links: links.map((ends) => ({ ends })),
        "l2-services": wires.map((ends, i) => ({ name: `w${i}`, kind: "wire", attachments: ends.map((node) => ({ node, interface: "ac" })) })),
      }),
      "prop.yaml",
    );
  const ok = (r: ReturnType<typeof plan>) => {
    if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
    return r.plan;
  };

  it("a node removed while another is added to its site does not pass its locator on", () => {
    const a = run(ok(plan(["r1", "r2"], [], [])));
    const b = run(ok(plan(["r1", "r3"], [], [])), reread(a));
    const r2 = a.table.nodes.find((n) => n.node === "r2")!.locators[0]!.prefix;
    expect(b.table.nodes.find((n) => n.node === "r3")!.locators[0]!.prefix.equals(r2)).toBe(false);
    expect(b.lock.retired.some((x) => x.kind === "node" && x.was === "r2")).toBe(true);
  });

  it("a SID removed while another is added on the same locator does not pass its function on, and the lock stays usable", () => {
    const a = run(ok(plan(["r1", "r2", "r3"], [["r1", "r2"]], [])));
    const endX = a.table.nodes.find((n) => n.node === "r1")!.sids.find((s) => s.behavior === "End.X")!;
    const b = run(ok(plan(["r1", "r2", "r3"], [["r1", "r3"]], [])), reread(a));
    const fresh = b.table.nodes.find((n) => n.node === "r1")!.sids.find((s) => s.behavior === "End.X")!;
    expect(fresh.context.neighbor).toBe("r3");
    expect(fresh.sid).not.toBe(endX.sid);
    expect(run(b.plan, reread(b)).added).toBe(0);
  });
});

describe("allocator properties on random valid plans", () => {
  it("the generator covers both layouts, every level count and both Flex-Algo forms", () => {
    // Guards the generator itself: a narrow generator would make the properties below vacuous.
    const kinds = new Set<string>();
    fc.assert(
      fc.property(specArb, (s) => {
        const m = buildModel(s);
        const p = load(m);
        kinds.add(`${p.blocks[0]!.layout.kind}/${p.levels.length}`);
        kinds.add(`blocks ${p.blocks.length} algos ${p.algorithms.length}`);
        if (m.anycastPlace !== undefined) kinds.add("anycast");
      }),
      { seed: 20240601, numRuns: 120 },
    );
    for (const k of ["classic/1", "classic/2", "classic/3", "compressed/1", "compressed/2", "compressed/3", "blocks 1 algos 1", "blocks 1 algos 2", "blocks 2 algos 2", "anycast"]) {
      expect(kinds.has(k), k).toBe(true);
    }
  });

  it("locators are disjoint unless anycast; SIDs lie in their locator, fit 128 bits and are unique", () => {
    fc.assert(
      fc.property(specArb, (s) => {
        const a = run(load(buildModel(s)));
        expect(violations(a)).toEqual([]);
      }),
      { seed: 1729, ...FC },
    );
  });

  it("writes its SIDs as columns that agree with bigint arithmetic, the lock and the object writer", () => {
    fc.assert(
      fc.property(specArb, (s) => {
        const a = run(load(buildModel(s)));
        // JSON from SID objects made a node at a time (before the table's own objects exist)
        const freshJson = [...jsonChunks(a.packed, a.packed.nodeIdsByName().map((id) => a.packed.freshNode(id)))].join("");
        const t = a.table; // made from the columns
        expect(freshJson).toBe(tableToJson(t));
        let count = 0;
        for (const n of t.nodes) {
          const ownerOf = new Map(n.locators.map((l) => [l.prefix, l.anycast ? `anycast:${l.anycast}` : n.node]));
          n.sids.forEach((e, k) => {
            count++;
            const st = e.structure!;
            // the address, carved with bigints: locator, then the function below block and node
            expect(e.sid).toBe(e.locator!.first | (e.function << BigInt(128 - st.block - st.node - st.function)));
            // the function value and key are the lock's (a SID without a function field has no entry)
            if (st.function > 0) expect(a.lock.functions.get(ownerOf.get(e.locator!)!)?.get(e.key)).toBe(e.function);
            // each node's SIDs by address, then algorithm, then behaviour
            const prev = n.sids[k - 1];
            if (prev) expect(prev.sid < e.sid || (prev.sid === e.sid && (prev.algorithm < e.algorithm || (prev.algorithm === e.algorithm && prev.behavior <= e.behavior)))).toBe(true);
          });
        }
        expect(a.packed.count).toBe(count);
        // the CSV written from the columns is the CSV written from the objects, byte for byte
        const fromColumns = Buffer.concat([...csvPackedChunks(a.packed, a.packed.nodeIdsByName(), 997)]);
        const fromObjects = Buffer.concat([...csvByteChunks(t.plan, t.nodes, 997)]);
        expect(fromColumns.toString("latin1")).toBe(fromObjects.toString("latin1"));
      }),
      { seed: 9800, ...FC },
    );
  });

  it("is idempotent: allocating with its own lock gives the same lock and the same table", () => {
    fc.assert(
      fc.property(specArb, (s) => {
        const plan = load(buildModel(s));
        const a = run(plan);
        const b = run(plan, reread(a));
        expect(serializeLock(b.lock)).toBe(serializeLock(a.lock));
        expect(tableToCsv(b.table)).toBe(tableToCsv(a.table));
        expect(b.added).toBe(0);
        expect(b.retiredNow).toEqual([]);
      }),
      { seed: 4242, ...FC },
    );
  });

  it("is stable when nodes, links and VRFs are added: every old SID row is still there", () => {
    fc.assert(
      fc.property(specArb, changeArb, (s, ch) => {
        const m = buildModel(s);
        const a = run(load(m));
        const b = run(load(grown(m, ch, "new")), reread(a));
        const after = new Set(rowsOf(b));
        expect(rowsOf(a).filter((r) => !after.has(r))).toEqual([]);
        expect(violations(b)).toEqual([]);
      }),
      { seed: 99, ...FC },
    );
  });

  it("never hands out the values of removed items again, even when other items are added", () => {
    fc.assert(
      fc.property(specArb, changeArb, (s, ch) => {
        const m = buildModel(s);
        const a = run(load(m));
        const gone = new Set(ch.removeNodes.map((i) => m.nodes[i % m.nodes.length]!.name));
        if (gone.size === m.nodes.length) gone.delete(m.nodes[0]!.name);
        let shrunk = withoutNodes(m, gone);
        const dropLinks = new Set(ch.removeLinks.map((i) => i % Math.max(1, shrunk.links.length)));
        shrunk = { ...shrunk, links: shrunk.links.filter((_, i) => !dropLinks.has(i)) };
        const b = run(load(shrunk), reread(a));
        // Re-add: new nodes, new links (possibly between the same routers as a removed one), a new VRF.
        const c = run(load(grown(shrunk, ch, "re")), reread(b));
        const stillThere = addressesOf(b);
        const freed = [...addressesOf(a)].filter((x) => !stillThere.has(x));
        const now = addressesOf(c);
        expect(freed.filter((x) => now.has(x)).map((x) => x.toString(16))).toEqual([]);
        // The same removals and additions in a single run (from a's lock): an item that is in both
        // plans keeps its SID, and no other item may take an address that a held.
        const d = run(load(grown(shrunk, ch, "re")), reread(a));
        const before = holders(a);
        const taken = [...holders(d)].filter(([x, hs]) => before.has(x) && [...hs].some((h) => !before.get(x)!.has(h)));
        expect(taken.map(([x, hs]) => `${x.toString(16)} ${[...hs].join(",")}`)).toEqual([]);
        // removed nodes' locators are not given to anyone
        const oldLocators = a.table.nodes.filter((n) => gone.has(n.node)).flatMap((n) => n.locators.filter((l) => l.anycast === "").map((l) => l.prefix));
        for (const later of [c, d]) {
          const newLocators = later.table.nodes.flatMap((n) => n.locators.map((l) => l.prefix));
          expect(oldLocators.filter((o) => newLocators.some((p) => p.overlaps(o))).map((p) => p.format())).toEqual([]);
          expect(violations(later)).toEqual([]);
          // the lock stays usable: allocating again changes nothing
          const again = run(later.plan, reread(later));
          expect(serializeLock(again.lock)).toBe(serializeLock(later.lock));
        }
      }),
      { seed: 31337, ...FC },
    );
  });
  it("allocates the same from a lock read by the fast reader as from one read by JSON.parse (the reference), after any change", () => {
    /** Everything an allocation run says, as text. */
    const said = (r: ReturnType<typeof allocate>) =>
      r.ok
        ? ["ok", serializeLock(r.allocation.lock), tableToCsv(r.allocation.table), r.allocation.added, JSON.stringify(r.allocation.retiredNow, (_, v) => (typeof v === "bigint" ? v.toString(16) : v)), JSON.stringify(r.allocation.moves)].join("\n")
        : ["failed", ...r.diagnostics.map(formatDiagnostic), JSON.stringify(r.moves)].join("\n");
    fc.assert(
      fc.property(specArb, changeArb, (s, ch) => {
        const m = buildModel(s);
        const a = run(load(m));
        const text = serializeLock(a.lock);
        const fastLock = parseLock(Buffer.from(text), "prop.lock.json", a.plan.name);
        const readable = parseLockReadable(text, "prop.lock.json", a.plan.name);
        if (!fastLock.ok || !readable.ok) throw new Error("lock did not read back");
        const gone = new Set(ch.removeNodes.map((i) => m.nodes[i % m.nodes.length]!.name));
        if (gone.size === m.nodes.length) gone.delete(m.nodes[0]!.name);
        const shrunk = withoutNodes(m, gone);
        for (const later of [m, grown(m, ch, "new"), shrunk, grown(shrunk, ch, "re")]) {
          const plan = load(later);
          for (const allowRenumber of [false, true]) {
            // a fresh fast read each time: its Maps fill themselves when used, and must not depend on it
            const again = parseLock(Buffer.from(text), "prop.lock.json", a.plan.name);
            if (!again.ok) throw new Error("lock did not read back");
            expect(said(allocate(plan, again.lock, { allowRenumber }))).toBe(said(allocate(plan, readable.lock, { allowRenumber })));
          }
          expect(said(allocate(plan, fastLock.lock, { allowRenumber: true }))).toBe(said(allocate(plan, readable.lock, { allowRenumber: true })));
        }
      }),
      { seed: 8986, ...FC },
    );
  });
});
