/**
 * Turns schema-valid plan data into the normalised Plan model, checking what a schema cannot:
 * bit budgets, host bits, references between objects and the capacity of every level.
 */
import { Prefix, parsePrefix } from "../net/prefix.js";
import { rangesOverlapping } from "../net/special.js";
import { type Flavor, normalizeFlavors, parseFlavor } from "../sid/behaviors.js";
import { type Diagnostic, quote } from "./diagnostic.js";
import type {
  AnycastGroup,
  Block,
  FibTable,
  Group,
  Infrastructure,
  L2Service,
  Layout,
  Level,
  LevelOrder,
  Link,
  LintSettings,
  Plan,
  PlanNode,
  Policy,
  PoolKind,
  Role,
  ValueRange,
  Vrf,
} from "./model.js";
import type { Locator } from "./source.js";

/** Address categories no SID block may touch (IANA special-purpose and address-space registries). */
const UNUSABLE_FOR_SIDS = new Set(["loopback", "unspecified", "ipv4-mapped", "ipv4-compatible", "link-local", "multicast"]);

/** Default share of a level or pool in use above which the linter warns (our own choice, documented in the README). */
export const DEFAULT_CAPACITY_THRESHOLD = 0.8;

type Raw = Record<string, any>;
type Path = (string | number)[];

/** Parse "12", "0x0c" or 12 into a bigint. */
export function parseValue(v: unknown): bigint {
  if (typeof v === "number") return BigInt(v);
  const s = String(v).trim();
  return BigInt(s);
}

/** Parse "first-last" or a single value into a range. */
export function parseRange(v: unknown): ValueRange {
  if (typeof v === "number") return { first: BigInt(v), last: BigInt(v) };
  const s = String(v);
  const m = /^\s*(\S+?)\s*-\s*(\S+)\s*$/.exec(s);
  if (m) return { first: parseValue(m[1]), last: parseValue(m[2]) };
  const x = parseValue(s);
  return { first: x, last: x };
}

/** Render a range the way a plan writes it. */
export function formatRange(r: ValueRange, hexDigits = 0): string {
  const h = (x: bigint) => "0x" + x.toString(16).padStart(hexDigits, "0");
  return r.first === r.last ? h(r.first) : `${h(r.first)}-${h(r.last)}`;
}

/** Count of values in a list of ranges (ranges assumed disjoint). */
export function rangeSize(rs: readonly ValueRange[]): bigint {
  let n = 0n;
  for (const r of rs) n += r.last - r.first + 1n;
  return n;
}

export function inRanges(v: bigint, rs: readonly ValueRange[]): boolean {
  for (const r of rs) if (v >= r.first && v <= r.last) return true;
  return false;
}

/** Normalise schema-valid data. Returns the plan, or every problem found (all of them, not just the first). */
export function normalizePlan(raw: Raw, file: string, locate: Locator): { ok: true; plan: Plan } | { ok: false; diagnostics: Diagnostic[] } {
  const diags: Diagnostic[] = [];
  const err = (code: string, path: Path, message: string) => diags.push({ code, message, location: locate(path) });

  // --- algorithms
  const algorithms: { id: number; name: string }[] = (raw.algorithms ?? [{ id: 0 }]).map((a: Raw) => ({
    id: a.id as number,
    name: (a.name as string | undefined) ?? (a.id === 0 ? "default" : `flex-algo-${a.id}`),
  }));
  const algoIds = new Set<number>();
  algorithms.forEach((a, i) => {
    if (algoIds.has(a.id)) err("plan/duplicate", ["algorithms", i, "id"], `algorithm ${a.id} is listed twice`);
    algoIds.add(a.id);
  });

  // --- levels
  const levels: Level[] = (raw.levels as Raw[]).map((l, i) => {
    const order = (l.order === "centermost" ? "centremost" : (l.order ?? "sequential")) as LevelOrder;
    const reserved = ((l.reserved ?? []) as unknown[]).map(parseRange);
    reserved.forEach((r, j) => {
      if (r.first > r.last) err("plan/range", ["levels", i, "reserved", j], `range ${quote(l.reserved[j])} ends before it starts`);
      if (r.last >= 1n << BigInt(l.bits)) err("plan/range", ["levels", i, "reserved", j], `reserved value ${quote(l.reserved[j])} does not fit the ${l.bits}-bit level ${quote(l.name)} (0..${(1n << BigInt(l.bits)) - 1n})`);
    });
    return { name: l.name as string, bits: l.bits as number, order, reserved };
  });
  const levelBits = levels.reduce((s, l) => s + l.bits, 0);
  const levelNames = new Set<string>();
  levels.forEach((l, i) => {
    if (levelNames.has(l.name)) err("plan/duplicate", ["levels", i, "name"], `level ${quote(l.name)} is listed twice`);
    levelNames.add(l.name);
  });

  // --- blocks
  const blocks: Block[] = [];
  const blockNames = new Set<string>();
  (raw.blocks as Raw[]).forEach((b, i) => {
    const at = ["blocks", i];
    if (blockNames.has(b.name)) err("plan/duplicate", [...at, "name"], `block ${quote(b.name)} is listed twice`);
    blockNames.add(b.name);
    const pr = parsePrefix(b.prefix);
    if (!pr.ok) return err("plan/prefix", [...at, "prefix"], pr.reason);
    const prefix = pr.value;
    if (prefix.hasHostBits) {
      return err("plan/host-bits", [...at, "prefix"], `block prefix ${quote(b.prefix)} has bits set after /${prefix.len}; did you mean ${prefix.masked().format()}?`);
    }
    // Space where a SID can never work: refuse at load (softer cases are lint findings).
    const unusable = rangesOverlapping(prefix).find((r) => UNUSABLE_FOR_SIDS.has(r.category));
    if (unusable) {
      return err("plan/block-space", [...at, "prefix"], `block prefix ${prefix.format()} overlaps ${unusable.text} (${unusable.name}, ${unusable.source}), where SIDs cannot be routed; choose a block in 5f00::/16 (RFC 9602) or in the operator's own unicast space`);
    }
    const algos: number[] = b.algorithms ?? [0];
    algos.forEach((a, j) => {
      if (!algoIds.has(a)) err("plan/reference", [...at, "algorithms", j], `algorithm ${a} is not declared under algorithms (declared: ${[...algoIds].join(", ")})`);
    });
    const needAlgoBits = algos.length > 1 ? Math.ceil(Math.log2(algos.length)) : 0;
    const algorithmBits: number = b["algorithm-bits"] ?? needAlgoBits;
    if (algorithmBits < needAlgoBits) {
      err("plan/capacity", [...at, "algorithm-bits"], `block ${quote(b.name)} serves ${algos.length} algorithms but algorithm-bits ${algorithmBits} holds only ${2 ** algorithmBits}; use at least ${needAlgoBits}`);
    }
    if (b.structure && b.compression) return err("plan/structure", at, `block ${quote(b.name)} has both structure and compression; give one (structure for classic SIDs, compression for RFC 9800 C-SIDs)`);
    if (!b.structure && !b.compression) return err("plan/structure", at, `block ${quote(b.name)} needs a structure (node/function/argument bits) or a compression layout`);
    let layout: Layout;
    const blockBits = prefix.len;
    if (b.structure) {
      const s = b.structure as Raw;
      if (s.block !== undefined && s.block !== blockBits) {
        err("plan/structure", [...at, "structure", "block"], `structure.block is ${s.block} but the block prefix ${prefix.format()} is /${blockBits}; they must agree`);
      }
      const argumentBits = (s.argument ?? 0) as number;
      const total = blockBits + s.node + s.function + argumentBits;
      if (total > 128) {
        err("plan/structure", [...at, "structure"], `a structure of ${total} bits (block ${blockBits} + node ${s.node} + function ${s.function} + argument ${argumentBits}) does not fit an IPv6 address; at most 128 bits are allowed (RFC 8986 §3.1)`);
      }
      if (s.node < 1) err("plan/structure", [...at, "structure", "node"], "node bits must be at least 1: each node needs its own locator");
      layout = { kind: "classic", blockBits, nodeBits: s.node, functionBits: s.function, argumentBits };
    } else {
      const c = b.compression as Raw;
      const flavor = String(c.flavor).toUpperCase().replace("C-SID", "CSID") as "NEXT-CSID" | "REPLACE-CSID";
      const csidBits = c["csid-bits"] as number;
      if (csidBits !== 16 && csidBits !== 32) {
        err("plan/structure", [...at, "compression", "csid-bits"], `csid-bits ${csidBits} is not allowed; RFC 9800 defines C-SID lengths of 16 and 32 bits`);
      }
      // REPLACE-CSID with 32-bit C-SIDs packs node and function into one C-SID (RFC 9800 §6.4:
      // LNFL = 32); our own default split is 16 + 16. Everything else defaults to a whole node C-SID.
      const nodeBits = (c["node-bits"] ?? (flavor === "REPLACE-CSID" && csidBits === 32 ? 16 : csidBits)) as number;
      const twoCsid = nodeBits === csidBits;
      if (flavor === "REPLACE-CSID" && csidBits === 32 && twoCsid) {
        err("plan/structure", [...at, "compression", "node-bits"], `with REPLACE-CSID and 32-bit C-SIDs, node and function share one C-SID (RFC 9800 §6.4): node-bits must be below 32, e.g. 16; got ${nodeBits}`);
      }
      if (flavor === "NEXT-CSID" && !twoCsid) {
        err("plan/structure", [...at, "compression", "node-bits"], `with NEXT-CSID the node field is one whole C-SID: node-bits must equal csid-bits (${csidBits}), got ${nodeBits}`);
      }
      if (nodeBits > csidBits || nodeBits < 1) {
        err("plan/structure", [...at, "compression", "node-bits"], `node-bits ${nodeBits} must be between 1 and csid-bits (${csidBits})`);
      }
      const functionBits = twoCsid ? csidBits : csidBits - nodeBits;
      const argBits = (c.argument ?? 0) as number;
      const used = blockBits + nodeBits + functionBits + argBits;
      if (used > 128) {
        err("plan/structure", [...at, "compression"], `block /${blockBits} + node ${nodeBits} + function ${functionBits}${argBits ? ` + argument ${argBits}` : ""} = ${used} bits; at most 128 are allowed (RFC 8986 §3.1)`);
      }
      if (flavor === "REPLACE-CSID") {
        const indexBits = Math.ceil(Math.log2(128 / csidBits));
        const maxLbl = 128 - csidBits - indexBits;
        if (blockBits > maxLbl) {
          err("plan/structure", [...at, "prefix"], `a REPLACE-CSID block with ${csidBits}-bit C-SIDs may be at most /${maxLbl} (128 - C-SID ${csidBits} - index ${indexBits} bits, RFC 9800 §4.2); ${prefix.format()} is /${blockBits}`);
        }
      }
      const max = (1n << BigInt(csidBits)) - 1n;
      const pool = (key: string): ValueRange[] => {
        const list = ((c[key] ?? []) as unknown[]).map(parseRange);
        list.forEach((r, j) => {
          const p = [...at, "compression", key, j];
          if (r.first > r.last) err("plan/range", p, `range ${quote(c[key][j])} ends before it starts`);
          else if (r.first === 0n) err("plan/range", p, `C-SID value 0 is reserved (it marks the end of a container, RFC 9800 §5); start ${key} at 1 or above`);
          else if (r.last > max) err("plan/range", p, `range ${quote(c[key][j])} does not fit a ${csidBits}-bit C-SID (1..0x${max.toString(16)})`);
        });
        return list;
      };
      const gib = pool("global-pool");
      const lib = pool("local-pool");
      if (twoCsid && lib.length === 0) {
        err("plan/structure", [...at, "compression"], `block ${quote(b.name)} puts functions in a separate local C-SID, so it needs a local-pool (LIB) of C-SID values, e.g. a range at the top of the ${csidBits}-bit space`);
      }
      layout = { kind: "compressed", flavor, blockBits, csidBits, nodeBits, functionBits, twoCsid, gib, lib, argumentBits: (c.argument ?? 0) as number };
    }
    if (algorithmBits + levelBits !== layout.nodeBits) {
      err(
        "plan/structure",
        at,
        `block ${quote(b.name)} has ${layout.nodeBits} node bits but the levels take ${levelBits} (${levels.map((l) => `${l.name} ${l.bits}`).join(" + ")})${algorithmBits ? ` plus ${algorithmBits} algorithm bits` : ""}; the node bits must equal the sum`,
      );
    }
    // Blocks are carved independently: two that share addresses would hand one locator to two
    // nodes (or one node two locators that overlap). Refuse the later one.
    const clash = blocks.find((o) => o.prefix.overlaps(prefix));
    if (clash) {
      return err("plan/block-overlap", [...at, "prefix"], `block ${quote(b.name)} (${prefix.format()}) overlaps block ${quote(clash.name)} (${clash.prefix.format()}); blocks must not share addresses (one block can serve several algorithms with algorithm-bits)`);
    }
    blocks.push({ name: b.name, index: i, prefix, algorithms: algos, algorithmBits, groups: b.groups ?? [], layout });
  });

  // --- groups (nested mapping; depth 0 = first level)
  const groups: Group[] = [];
  const groupByPath = new Map<string, Group>();
  let groupOrder = 0;
  const walk = (obj: Raw | undefined, parent: string | undefined, depth: number, at: Path) => {
    if (!obj) return;
    for (const [gname, g] of Object.entries(obj)) {
      const gat = [...at, gname];
      const path = parent ? `${parent}/${gname}` : gname;
      if (gname.includes("/")) err("plan/name", gat, `group name ${quote(gname)} may not contain '/' (it separates levels in a place)`);
      if (depth >= levels.length - 1) {
        err("plan/structure", gat, `group ${quote(path)} sits at level ${depth + 1}, but the last level (${quote(levels[levels.length - 1]!.name)}) is for nodes; the plan has ${levels.length} levels so groups may nest ${levels.length - 1} deep`);
        continue;
      }
      const level = levels[depth]!;
      let pinned: bigint | undefined;
      if (g?.value !== undefined) {
        pinned = parseValue(g.value);
        if (pinned >= 1n << BigInt(level.bits)) err("plan/range", [...gat, "value"], `value ${quote(g.value)} does not fit the ${level.bits}-bit level ${quote(level.name)} (0..${(1n << BigInt(level.bits)) - 1n})`);
      }
      let summary: Prefix | undefined;
      if (g?.summary !== undefined) {
        const s = parsePrefix(g.summary);
        if (!s.ok) err("plan/prefix", [...gat, "summary"], s.reason);
        else summary = s.value;
      }
      const group: Group = { path, name: gname, depth, parent, pinned, summary, order: groupOrder++ };
      groups.push(group);
      groupByPath.set(path, group);
      walk(g?.groups, path, depth + 1, [...gat, "groups"]);
    }
  };
  walk(raw.groups, undefined, 0, ["groups"]);

  // --- nodes
  const nodes: PlanNode[] = [];
  const nodeNames = new Set<string>();
  const lastLevel = levels[levels.length - 1]!;
  const placeDepth = levels.length - 1;
  const defaultAlgos = algorithms.map((a) => a.id);
  (raw.nodes as Raw[]).forEach((n, i) => {
    const at = ["nodes", i];
    if (nodeNames.has(n.name)) err("plan/duplicate", [...at, "name"], `node ${quote(n.name)} is listed twice; node names must be unique`);
    nodeNames.add(n.name);
    const place = (n.place ?? "") as string;
    if (placeDepth > 0) {
      const g = groupByPath.get(place);
      if (!g) {
        err("plan/reference", [...at, "place"], `place ${quote(place)} is not a group of the plan; write the path of a ${levels[placeDepth - 1]!.name} such as ${quote(groups.find((x) => x.depth === placeDepth - 1)?.path ?? "region/site")}`);
      } else if (g.depth !== placeDepth - 1) {
        err("plan/reference", [...at, "place"], `place ${quote(place)} is a ${levels[g.depth]!.name}; nodes sit in a ${levels[placeDepth - 1]!.name} (a path of ${placeDepth} names)`);
      }
    } else if (place !== "") {
      err("plan/reference", [...at, "place"], `the plan has a single level, so nodes take no place; remove ${quote(place)}`);
    }
    let pinned: bigint | undefined;
    if (n.value !== undefined) {
      pinned = parseValue(n.value);
      if (pinned >= 1n << BigInt(lastLevel.bits)) err("plan/range", [...at, "value"], `value ${quote(n.value)} does not fit the ${lastLevel.bits}-bit level ${quote(lastLevel.name)} (0..${(1n << BigInt(lastLevel.bits)) - 1n})`);
    }
    const algos: number[] = n.algorithms ?? defaultAlgos;
    algos.forEach((a, j) => {
      if (!algoIds.has(a)) err("plan/reference", [...at, "algorithms", j], `algorithm ${a} is not declared under algorithms (declared: ${[...algoIds].join(", ")})`);
    });
    const m = (n.msd ?? {}) as Raw;
    nodes.push({
      name: n.name,
      index: i,
      place,
      role: (n.role ?? "p") as Role,
      pinned,
      algorithms: algos,
      anycast: n.anycast ?? [],
      msd: { maxSl: m["max-sl"], maxEndPop: m["max-end-pop"], maxHEncaps: m["max-h-encaps"], maxEndD: m["max-end-d"] },
    });
  });
  const nodeSet = nodeNames;
  const needNode = (name: string, path: Path, what: string) => {
    if (!nodeSet.has(name)) err("plan/reference", path, `${what} ${quote(name)} is not a node of the plan`);
  };

  // --- anycast
  const anycastSeen = new Map<string, number>();
  const anycast: AnycastGroup[] = ((raw.anycast ?? []) as Raw[]).map((a, i) => {
    const at = ["anycast", i];
    // two groups of one name would share one lock entry and one member list: refuse the second
    const first = anycastSeen.get(a.name);
    if (first !== undefined) err("plan/duplicate", [...at, "name"], `anycast group ${quote(a.name)} is listed twice (first as anycast entry ${first + 1}); anycast group names must be unique`);
    else anycastSeen.set(a.name, i);
    const place = (a.place ?? "") as string;
    if (placeDepth > 0 && !groupByPath.has(place)) err("plan/reference", [...at, "place"], `place ${quote(place)} is not a group of the plan`);
    if (nodeSet.has(a.name)) err("plan/duplicate", [...at, "name"], `anycast group ${quote(a.name)} has the name of a node; use a name of its own`);
    const members = nodes.filter((n) => n.anycast.includes(a.name)).map((n) => n.name);
    return { name: a.name, place, pinned: a.value === undefined ? undefined : parseValue(a.value), algorithms: a.algorithms ?? defaultAlgos, members };
  });
  const anycastNames = new Set(anycast.map((a) => a.name));
  nodes.forEach((n) =>
    n.anycast.forEach((a, j) => {
      if (!anycastNames.has(a)) err("plan/reference", ["nodes", n.index, "anycast", j], `anycast group ${quote(a)} is not declared under anycast`);
    }),
  );

  // --- links
  const links: Link[] = ((raw.links ?? []) as Raw[]).map((l, i) => {
    const ends = (l.ends as (string | Raw)[]).map((e, j) => {
      const o = typeof e === "string" ? { node: e } : e;
      needNode(o.node, ["links", i, "ends", j], "link end");
      return {
        node: o.node as string,
        iface: o.interface as string | undefined,
        pinned: o.function === undefined ? undefined : parseValue(o.function),
        pinnedProtected: o["protected-function"] === undefined ? undefined : parseValue(o["protected-function"]),
      };
    }) as [Link["ends"][0], Link["ends"][1]];
    if (ends[0].node === ends[1].node) err("plan/reference", ["links", i, "ends"], `link ${i} joins node ${quote(ends[0].node)} to itself`);
    return { index: i, name: l.name ?? `${ends[0].node}--${ends[1].node}`, ends, protection: l.protection ?? "unprotected", algorithms: l.algorithms };
  });

  // --- services
  const vrfs: Vrf[] = ((raw.vrfs ?? []) as Raw[]).map((v, i) => {
    (v.pes as string[]).forEach((p, j) => needNode(p, ["vrfs", i, "pes", j], "PE"));
    const ces = ((v.ces ?? []) as Raw[]).map((c, j) => {
      needNode(c.pe, ["vrfs", i, "ces", j, "pe"], "PE");
      return { name: c.name as string, pe: c.pe as string, family: c.family as "ipv4" | "ipv6", iface: c.interface as string | undefined };
    });
    const algorithm = (v.algorithm ?? 0) as number;
    if (!algoIds.has(algorithm)) err("plan/reference", ["vrfs", i, "algorithm"], `algorithm ${algorithm} is not declared under algorithms`);
    return { name: v.name, table: v.table, families: v.families ?? ["ipv4", "ipv6"], mode: v.mode ?? "combined", algorithm, pes: v.pes, ces };
  });
  const l2: L2Service[] = ((raw["l2-services"] ?? []) as Raw[]).map((s, i) => {
    const attachments = ((s.attachments ?? []) as Raw[]).map((a, j) => {
      needNode(a.node, ["l2-services", i, "attachments", j, "node"], "attachment node");
      return { node: a.node as string, iface: a.interface as string | undefined, vlan: a.vlan as number | undefined };
    });
    ((s.nodes ?? []) as string[]).forEach((n, j) => needNode(n, ["l2-services", i, "nodes", j], "bridge node"));
    if (s.kind === "bridge" && !(s.nodes?.length > 0)) err("plan/reference", ["l2-services", i], `bridge ${quote(s.name)} lists no nodes; give the PEs that carry it under nodes`);
    if (s.kind !== "bridge" && attachments.length === 0) err("plan/reference", ["l2-services", i], `${s.kind} ${quote(s.name)} lists no attachments; give each attachment circuit (node and interface)`);
    return { name: s.name, kind: s.kind, algorithm: s.algorithm ?? 0, attachments, nodes: s.nodes ?? [] };
  });
  const policies: Policy[] = ((raw.policies ?? []) as Raw[]).map((p, i) => {
    needNode(p.node, ["policies", i, "node"], "policy headend");
    return { name: p.name, node: p.node, behavior: p.behavior ?? "End.B6.Encaps", algorithm: p.algorithm ?? 0, endpoint: p.endpoint, color: p.color };
  });
  const flav = (list: unknown[] | undefined): Flavor[] => (list ?? []).map((f) => parseFlavor(String(f))!).filter(Boolean);
  const tables: FibTable[] = ((raw.tables ?? []) as Raw[]).map((t, i) => {
    (t.nodes as string[]).forEach((n, j) => needNode(n, ["tables", i, "nodes", j], "table node"));
    return { name: t.name, table: t.table, nodes: t.nodes, flavors: flav(t.flavors) };
  });
  // Names that make up a SID's key in the lock may not repeat: two VRFs (or CEs of a VRF, L2
  // services, attachment circuits, policies of a headend, tables) with one name would give one
  // node two SIDs under one key, or quietly merge two services in the lock.
  const unique = <T>(list: readonly T[], keyOf: (x: T) => string, at: (i: number) => Path, say: (x: T, first: number) => string) => {
    const seen = new Map<string, number>();
    list.forEach((x, i) => {
      const k = keyOf(x);
      const first = seen.get(k);
      if (first !== undefined) err("plan/duplicate", at(i), say(x, first));
      else seen.set(k, i);
    });
  };
  unique(vrfs, (v) => v.name, (i) => ["vrfs", i, "name"], (v, f) => `VRF ${quote(v.name)} is listed twice (first as vrfs entry ${f + 1}); VRF names must be unique`);
  vrfs.forEach((v, i) =>
    unique(v.ces, (c) => c.name, (j) => ["vrfs", i, "ces", j, "name"], (c, f) => `CE ${quote(c.name)} is listed twice in VRF ${quote(v.name)} (first as ces entry ${f + 1}); CE names must be unique within a VRF`),
  );
  unique(l2, (s) => s.name, (i) => ["l2-services", i, "name"], (s, f) => `L2 service ${quote(s.name)} is listed twice (first as l2-services entry ${f + 1}); L2 service names must be unique`);
  l2.forEach((s, i) =>
    unique(
      s.attachments,
      (a) => JSON.stringify([a.node, a.iface ?? null, a.vlan ?? null]),
      (j) => ["l2-services", i, "attachments", j],
      (a, f) => `attachment ${quote(a.node)}${a.iface ? ` interface ${quote(a.iface)}` : ""}${a.vlan !== undefined ? ` VLAN ${a.vlan}` : ""} is listed twice in ${s.kind} ${quote(s.name)} (first as attachments entry ${f + 1}); each attachment circuit needs an interface or VLAN of its own`,
    ),
  );
  unique(policies, (p) => JSON.stringify([p.node, p.name]), (i) => ["policies", i, "name"], (p, f) => `policy ${quote(p.name)} is listed twice on headend ${quote(p.node)} (first as policies entry ${f + 1}); policy names must be unique on a headend`);
  unique(tables, (t) => t.name, (i) => ["tables", i, "name"], (t, f) => `table ${quote(t.name)} is listed twice (first as tables entry ${f + 1}); table names must be unique`);
  // Each End SID is known by its flavour set (order does not count): two entries with the same
  // set would be one SID listed twice, and the lock would then hold one value for two SIDs.
  const endSids = ((raw["end-sids"] ?? [{ flavors: [] }]) as Raw[]).map((e) => flav(e.flavors));
  const endSeen = new Map<string, number>();
  endSids.forEach((f, i) => {
    const k = normalizeFlavors(f).join("+");
    const first = endSeen.get(k);
    if (first !== undefined) err("plan/duplicate", ["end-sids", i, "flavors"], `end-sids entry ${i + 1} (${k ? quote(k) : "no flavours"}) has the flavours of entry ${first + 1}; each End SID needs a flavour set of its own`);
    else endSeen.set(k, i);
  });
  const infrastructure: Infrastructure[] = [];
  ((raw.infrastructure ?? []) as Raw[]).forEach((x, i) => {
    const pr = parsePrefix(x.prefix);
    if (!pr.ok) return err("plan/prefix", ["infrastructure", i, "prefix"], pr.reason);
    infrastructure.push({ name: x.name, prefix: pr.value, kind: x.kind ?? "other" });
  });

  // --- pools
  const functionPools: Partial<Record<PoolKind, ValueRange[]>> = {};
  for (const [k, v] of Object.entries((raw["function-pools"] ?? {}) as Record<string, unknown[]>)) {
    functionPools[k as PoolKind] = v.map(parseRange);
    functionPools[k as PoolKind]!.forEach((r, j) => {
      if (r.first > r.last) err("plan/range", ["function-pools", k, j], `range ${quote(v[j])} ends before it starts`);
    });
  }
  const reservedFunctions = ((raw["reserved-functions"] ?? []) as unknown[]).map(parseRange);

  // --- lint settings
  const l = (raw.lint ?? {}) as Raw;
  const lint: LintSettings = {
    severity: l.severity ?? {},
    capacityThreshold: l["capacity-threshold"] ?? DEFAULT_CAPACITY_THRESHOLD,
    production: l.production ?? false,
    waivers: ((l.waivers ?? []) as Raw[]).map((w, index) => ({ rule: w.rule, objects: w.objects, reason: w.reason, expires: w.expires, index })),
  };

  // --- capacity of every level (demand vs room), named with numbers
  if (diags.length === 0) checkCapacity(levels, groups, nodes, anycast, err);

  if (diags.length > 0) return { ok: false, diagnostics: diags };
  return {
    ok: true,
    plan: {
      file,
      name: raw.plan,
      operator: raw.operator,
      algorithms,
      levels,
      blocks,
      groups,
      nodes,
      anycast,
      links,
      vrfs,
      l2,
      policies,
      tables,
      infrastructure,
      endSids,
      adjacencyFlavors: flav(raw["adjacency-flavors"]),
      functionPools,
      reservedFunctions,
      lint,
      locate,
    },
  };
}

/** Usable values of a level: 2^bits minus its reserved values. */
export function levelCapacity(level: Level): bigint {
  let reserved = 0n;
  const max = (1n << BigInt(level.bits)) - 1n;
  for (const r of level.reserved) {
    const lo = r.first < 0n ? 0n : r.first;
    const hi = r.last > max ? max : r.last;
    if (hi >= lo) reserved += hi - lo + 1n;
  }
  return (1n << BigInt(level.bits)) - reserved;
}

function checkCapacity(levels: readonly Level[], groups: readonly Group[], nodes: readonly PlanNode[], anycast: readonly AnycastGroup[], err: (code: string, path: Path, m: string) => void): void {
  const children = new Map<string, number>();
  for (const g of groups) children.set(g.parent ?? "", (children.get(g.parent ?? "") ?? 0) + 1);
  for (const n of nodes) children.set(`node:${n.place}`, (children.get(`node:${n.place}`) ?? 0) + 1);
  for (const a of anycast) children.set(`node:${a.place}`, (children.get(`node:${a.place}`) ?? 0) + 1);
  for (const [key, demand] of children) {
    const isNode = key.startsWith("node:");
    const parent = isNode ? key.slice(5) : key;
    const depth = isNode ? levels.length - 1 : parent === "" ? 0 : parent.split("/").length;
    const level = levels[depth]!;
    const cap = levelCapacity(level);
    if (BigInt(demand) > cap) {
      const where = parent === "" ? "the plan" : `group ${quote(parent)}`;
      const path: Path = isNode ? ["nodes"] : parent === "" ? ["groups"] : ["groups", ...parent.split("/").flatMap((p, i) => (i === 0 ? [p] : ["groups", p]))];
      err("plan/capacity", path, `level ${quote(level.name)} (${level.bits} bits) holds ${cap} values but ${where} asks for ${demand} ${isNode ? "nodes and anycast groups" : "groups"}; widen the level or split the ${isNode ? "place" : "groups"}`);
    }
  }
}
