/**
 * What moves between two SID tables: per node, locators and SIDs added, removed and renumbered,
 * and SIDs whose behaviour, flavours, codepoint, structure or binding changed at the same address.
 * Pure: the tables may come from a plan and its lock or from an inventory file, in any mix.
 */
import type { LocatorEntry, NodeTable, SidEntry, SidTable } from "../sid/table.js";
import { sidKeyFromContext } from "../sid/table-read.js";

/** What happened to a SID or locator between the old and the new table. */
export type ChangeKind = "added" | "removed" | "renumbered" | "changed";

/** An attribute that differs between the old and the new form of one SID. */
export type SidField = "behavior" | "flavors" | "codepoint" | "structure" | "context" | "locator";

/** Something a change reaches: a VRF, an adjacency, a service, a policy, a table, or the node itself. */
export interface Touch {
  readonly kind: "node" | "vrf" | "adjacency" | "service" | "policy" | "table";
  readonly name: string;
}

export interface SidChange {
  readonly kind: ChangeKind;
  /** The binding identity (algorithm, behaviour, End flavours, context); of the new SID unless removed. */
  readonly binding: string;
  readonly old: SidEntry | undefined;
  readonly new: SidEntry | undefined;
  /** For "changed" and "renumbered": what differs besides the address (empty for a pure renumbering). */
  readonly fields: readonly SidField[];
  readonly touches: readonly Touch[];
}

export interface LocatorChange {
  readonly kind: "added" | "removed" | "renumbered";
  readonly old: LocatorEntry | undefined;
  readonly new: LocatorEntry | undefined;
}

export interface NodeDiff {
  readonly node: string;
  /** "added" / "removed": the node is only in the new / old table. */
  readonly status: "added" | "removed" | "changed";
  readonly locators: readonly LocatorChange[];
  readonly sids: readonly SidChange[];
  /** Union of what the node's changes touch, sorted. */
  readonly touches: readonly Touch[];
}

export interface DiffCounts {
  readonly locatorsAdded: number;
  readonly locatorsRemoved: number;
  readonly locatorsRenumbered: number;
  readonly sidsAdded: number;
  readonly sidsRemoved: number;
  readonly sidsRenumbered: number;
  readonly sidsChanged: number;
  readonly sidsUnchanged: number;
}

export interface TableDiff {
  /** Only nodes with at least one change, sorted by name. */
  readonly nodes: readonly NodeDiff[];
  readonly counts: DiffCounts;
  /** True when anything was removed, renumbered or changed: live traffic may break. */
  readonly disruptive: boolean;
}

/**
 * The binding identity used to match SIDs: `sidKeyFromContext` with flavours upper-cased and
 * sorted, so that a plan's SIDs and a table's rows compare alike whatever order the table wrote.
 * End SIDs with different flavours are different bindings (the key keeps End's flavours).
 */
export function bindingOf(s: SidEntry): string {
  const flavors = s.flavors.map((f) => f.toUpperCase()).sort();
  return sidKeyFromContext(s.behavior, flavors, s.algorithm, s.context);
}

const cmpStr = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
const cmpBig = (a: bigint, b: bigint) => (a < b ? -1 : a > b ? 1 : 0);

/** Context without the `link` label, which names a plan's link but binds nothing. */
function contextText(s: SidEntry): string {
  return Object.keys(s.context)
    .filter((k) => k !== "link")
    .sort()
    .map((k) => `${k}=${s.context[k]}`)
    .join(";");
}

/**
 * The attributes that differ between two forms of a SID. An attribute one side does not know
 * (a table without a codepoint, structure or locator column) is not compared.
 */
export function fieldsThatDiffer(a: SidEntry, b: SidEntry): SidField[] {
  const out: SidField[] = [];
  if (a.behavior !== b.behavior) out.push("behavior");
  const fa = a.flavors.map((f) => f.toUpperCase()).sort().join("+");
  const fb = b.flavors.map((f) => f.toUpperCase()).sort().join("+");
  if (fa !== fb) out.push("flavors");
  if (a.codepoint !== undefined && b.codepoint !== undefined && a.codepoint !== b.codepoint) out.push("codepoint");
  if (a.structure && b.structure) {
    const x = a.structure;
    const y = b.structure;
    if (x.block !== y.block || x.node !== y.node || x.function !== y.function || x.argument !== y.argument) out.push("structure");
  }
  if (contextText(a) !== contextText(b) || a.algorithm !== b.algorithm) out.push("context");
  if (a.locator && b.locator && !a.locator.equals(b.locator)) out.push("locator");
  return out;
}

/** What a SID is bound to, read from its context (End and End-like SIDs touch the node itself). */
export function touchesOf(node: string, s: SidEntry): Touch[] {
  const c = s.context;
  const out: Touch[] = [];
  if (c.vrf !== undefined) out.push({ kind: "vrf", name: c.vrf });
  if (c.neighbor !== undefined) out.push({ kind: "adjacency", name: `${node} -> ${c.neighbor}${c.interface ? ` (${c.interface})` : ""}` });
  if (c.service !== undefined) out.push({ kind: "service", name: c.service });
  if (c["bridge-domain"] !== undefined) out.push({ kind: "service", name: c["bridge-domain"] });
  if (c.policy !== undefined) out.push({ kind: "policy", name: c.policy });
  if (c.table !== undefined && c.vrf === undefined) out.push({ kind: "table", name: c.table });
  if (out.length === 0) out.push({ kind: "node", name: node });
  return out;
}

function sortTouches(ts: readonly Touch[]): Touch[] {
  const seen = new Map<string, Touch>();
  for (const t of ts) seen.set(`${t.kind}\u0000${t.name}`, t);
  return [...seen.entries()].sort(([a], [b]) => cmpStr(a, b)).map(([, t]) => t);
}

/** Offset of a SID inside its locator (its function and argument bits), when the locator is known. */
function offsetIn(s: SidEntry): bigint | undefined {
  if (!s.locator) return undefined;
  const hostBits = BigInt(128 - s.locator.len);
  return s.sid & ((1n << hostBits) - 1n);
}

const locatorKey = (l: LocatorEntry) => `${l.algorithm}|${l.prefix.format()}`;

function diffLocators(old: readonly LocatorEntry[], next: readonly LocatorEntry[]): LocatorChange[] {
  const oldKeys = new Map(old.map((l) => [locatorKey(l), l]));
  const newKeys = new Map(next.map((l) => [locatorKey(l), l]));
  const removed = [...oldKeys.entries()].filter(([k]) => !newKeys.has(k)).map(([, l]) => l);
  const added = [...newKeys.entries()].filter(([k]) => !oldKeys.has(k)).map(([, l]) => l);
  const out: LocatorChange[] = [];
  // One locator gone and one come for the same algorithm (and anycast group): the node moved.
  const group = (l: LocatorEntry) => `${l.algorithm}|${l.anycast}`;
  const takenAdded = new Set<LocatorEntry>();
  for (const r of removed) {
    const sameGroupRemoved = removed.filter((x) => group(x) === group(r));
    const sameGroupAdded = added.filter((x) => group(x) === group(r));
    if (sameGroupRemoved.length === 1 && sameGroupAdded.length === 1) {
      out.push({ kind: "renumbered", old: r, new: sameGroupAdded[0] });
      takenAdded.add(sameGroupAdded[0]!);
    } else out.push({ kind: "removed", old: r, new: undefined });
  }
  for (const a of added) if (!takenAdded.has(a)) out.push({ kind: "added", old: undefined, new: a });
  const at = (c: LocatorChange) => (c.old ?? c.new)!;
  return out.sort((a, b) => at(a).algorithm - at(b).algorithm || cmpBig(at(a).prefix.first, at(b).prefix.first) || at(a).prefix.len - at(b).prefix.len || cmpStr(a.kind, b.kind));
}

function groupBy(sids: readonly SidEntry[]): Map<string, SidEntry[]> {
  const m = new Map<string, SidEntry[]>();
  for (const s of sids) {
    const k = bindingOf(s);
    const list = m.get(k);
    if (list) list.push(s);
    else m.set(k, [s]);
  }
  for (const list of m.values()) list.sort((a, b) => cmpBig(a.sid, b.sid));
  return m;
}

/** Pairs of (old, new) taken out of two lists by a predicate, first match in order. */
function pairOff(olds: SidEntry[], news: SidEntry[], same: (o: SidEntry, n: SidEntry) => boolean): [SidEntry, SidEntry][] {
  const pairs: [SidEntry, SidEntry][] = [];
  for (let i = 0; i < olds.length; ) {
    const o = olds[i]!;
    const j = news.findIndex((n) => same(o, n));
    if (j >= 0) {
      pairs.push([o, news[j]!]);
      olds.splice(i, 1);
      news.splice(j, 1);
    } else i++;
  }
  return pairs;
}

interface SidCounts {
  unchanged: number;
}

function diffSids(node: string, old: readonly SidEntry[], next: readonly SidEntry[], counts: SidCounts): SidChange[] {
  const oldBy = groupBy(old);
  const newBy = groupBy(next);
  const out: SidChange[] = [];
  const leftOld: SidEntry[] = [];
  const leftNew: SidEntry[] = [];
  const keys = [...new Set([...oldBy.keys(), ...newBy.keys()])].sort();
  for (const key of keys) {
    const os = [...(oldBy.get(key) ?? [])];
    const ns = [...(newBy.get(key) ?? [])];
    // 1. the same binding at the same address: unchanged, or changed in flavour, codepoint, structure
    for (const [o, n] of pairOff(os, ns, (o, n) => o.sid === n.sid)) {
      const fields = fieldsThatDiffer(o, n);
      if (fields.length === 0) counts.unchanged++;
      else out.push({ kind: "changed", binding: key, old: o, new: n, fields, touches: touchesOf(node, n) });
    }
    // 2. the same binding at another address: renumbered. Prefer the pair that keeps its place
    // inside the locator (the node moved), then take them in address order.
    const renumbered = [
      ...pairOff(os, ns, (o, n) => {
        const a = offsetIn(o);
        return a !== undefined && a === offsetIn(n);
      }),
      ...pairOff(os, ns, () => true),
    ];
    for (const [o, n] of renumbered) {
      out.push({ kind: "renumbered", binding: key, old: o, new: n, fields: fieldsThatDiffer(o, n).filter((f) => f !== "locator"), touches: touchesOf(node, n) });
    }
    leftOld.push(...os);
    leftNew.push(...ns);
  }
  // 3. another binding at an address the node still uses: its behaviour, End flavours or context changed
  leftOld.sort((a, b) => cmpBig(a.sid, b.sid));
  leftNew.sort((a, b) => cmpBig(a.sid, b.sid));
  for (const [o, n] of pairOff(leftOld, leftNew, (o, n) => o.sid === n.sid)) {
    out.push({ kind: "changed", binding: bindingOf(n), old: o, new: n, fields: fieldsThatDiffer(o, n), touches: sortTouches([...touchesOf(node, o), ...touchesOf(node, n)]) });
  }
  // 4. the rest
  for (const o of leftOld) out.push({ kind: "removed", binding: bindingOf(o), old: o, new: undefined, fields: [], touches: touchesOf(node, o) });
  for (const n of leftNew) out.push({ kind: "added", binding: bindingOf(n), old: undefined, new: n, fields: [], touches: touchesOf(node, n) });
  const addr = (c: SidChange) => (c.old ?? c.new)!.sid;
  return out.sort((a, b) => cmpBig(addr(a), addr(b)) || cmpStr(a.kind, b.kind) || cmpStr(a.binding, b.binding));
}

/**
 * Compare two SID tables node by node. Nodes are matched by name; a node only in one table has
 * all its locators and SIDs added or removed. Identical tables give no nodes and `disruptive`
 * false. Duplicate rows (the same binding twice on a node) are matched one by one. Locators are
 * compared only where both sides list them (a CSV table without a locator column lists none).
 */
export function diffTables(old: SidTable, next: SidTable): TableDiff {
  const oldNodes = new Map<string, NodeTable>(old.nodes.map((n) => [n.node, n]));
  const newNodes = new Map<string, NodeTable>(next.nodes.map((n) => [n.node, n]));
  const names = [...new Set([...oldNodes.keys(), ...newNodes.keys()])].sort(cmpStr);
  const counts = { locatorsAdded: 0, locatorsRemoved: 0, locatorsRenumbered: 0, sidsAdded: 0, sidsRemoved: 0, sidsRenumbered: 0, sidsChanged: 0, sidsUnchanged: 0 };
  const nodes: NodeDiff[] = [];
  for (const name of names) {
    const o = oldNodes.get(name);
    const n = newNodes.get(name);
    const c = { unchanged: 0 };
    // A table without a locator column lists SIDs but no locators: nothing to compare there.
    const knows = (t: NodeTable | undefined) => !t || t.locators.length > 0 || t.sids.length === 0;
    const locators = knows(o) && knows(n) ? diffLocators(o?.locators ?? [], n?.locators ?? []) : [];
    const sids = diffSids(name, o?.sids ?? [], n?.sids ?? [], c);
    counts.sidsUnchanged += c.unchanged;
    for (const l of locators) {
      if (l.kind === "added") counts.locatorsAdded++;
      else if (l.kind === "removed") counts.locatorsRemoved++;
      else counts.locatorsRenumbered++;
    }
    for (const s of sids) {
      if (s.kind === "added") counts.sidsAdded++;
      else if (s.kind === "removed") counts.sidsRemoved++;
      else if (s.kind === "renumbered") counts.sidsRenumbered++;
      else counts.sidsChanged++;
    }
    if (locators.length === 0 && sids.length === 0) continue;
    const touches = sortTouches([...sids.flatMap((s) => s.touches), ...(locators.length > 0 ? [{ kind: "node" as const, name }] : [])]);
    nodes.push({ node: name, status: !o ? "added" : !n ? "removed" : "changed", locators, sids, touches });
  }
  const disruptive = counts.locatorsRemoved + counts.locatorsRenumbered + counts.sidsRemoved + counts.sidsRenumbered + counts.sidsChanged > 0;
  return { nodes, counts, disruptive };
}

/** Exit code of `sidcarve diff`: 0 for only additions (or accepted disruption), 1 otherwise. */
export function diffExitCode(d: TableDiff, acceptDisruption: boolean): 0 | 1 {
  return d.disruptive && !acceptDisruption ? 1 : 0;
}
