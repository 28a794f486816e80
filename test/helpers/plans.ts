/**
 * Helpers for tests: load a plan from an object or file and allocate it, failing loudly.
 */
import { readFileSync } from "node:fs";
import { stringify } from "yaml";
import { type Allocation, allocate } from "../../src/alloc/allocate.js";
import type { Lock } from "../../src/alloc/lock.js";
import { formatDiagnostic } from "../../src/plan/diagnostic.js";
import { loadPlanText } from "../../src/plan/load.js";
import type { Plan } from "../../src/plan/model.js";

export function planFrom(obj: unknown, file = "test.yaml"): Plan {
  const r = loadPlanText(stringify(obj), file);
  if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.plan;
}

export function planFile(path: string): Plan {
  const r = loadPlanText(readFileSync(path, "utf8"), path);
  if (!r.ok) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.plan;
}

export function alloc(plan: Plan, lock?: Lock, allowRenumber = false): Allocation {
  const r = allocate(plan, lock, { allowRenumber });
  if (!r.ok) throw new Error([...r.diagnostics.map(formatDiagnostic), ...r.moves.map((m) => `${m.what}: ${m.from} -> ${m.to}`)].join("\n"));
  return r.allocation;
}

/** Load errors of a plan object (empty when it loads). */
export function loadErrors(obj: unknown): { code: string; path: string; message: string; line?: number }[] {
  const r = loadPlanText(typeof obj === "string" ? obj : stringify(obj), "bad.yaml");
  if (r.ok) return [];
  return r.diagnostics.map((d) => ({ code: d.code, path: (d.location.path ?? []).join("."), message: d.message, line: d.location.line }));
}

/** A minimal classic plan to extend in tests. */
export function basePlan(extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    sidcarve: 1,
    plan: "test",
    levels: [
      { name: "region", bits: 4 },
      { name: "site", bits: 4 },
      { name: "router", bits: 8, reserved: [0] },
    ],
    blocks: [{ name: "b", prefix: "5f00:0:100::/48", structure: { node: 16, function: 16, argument: 0 } }],
    groups: { north: { groups: { quay: {}, mill: {} } }, south: { groups: { dock: {} } } },
    nodes: [
      { name: "r1", place: "north/quay" },
      { name: "r2", place: "north/quay" },
      { name: "r3", place: "north/mill" },
      { name: "r4", place: "south/dock" },
    ],
    links: [
      { ends: ["r1", "r2"] },
      { ends: ["r2", "r3"] },
      { ends: ["r3", "r4"] },
    ],
    ...extra,
  };
}

/** Every SID of an allocation as [node, sid text, behavior] rows, for comparisons. */
export function sidRows(a: Allocation): string[] {
  const out: string[] = [];
  for (const n of a.table.nodes) for (const s of n.sids) out.push(`${n.node} ${s.key} ${s.sid.toString(16)}`);
  return out.sort();
}
