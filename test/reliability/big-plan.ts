/**
 * Generated plans for the reliability tests: an invented operator's grid of sites, each a chain of
 * routers with protected adjacencies, every router a PE of one split VRF. Large enough that
 * writing its lock and its SID table takes a noticeable moment, so that a kill can land mid-write.
 */
import { stringify } from "yaml";

export interface GridOptions {
  readonly sites: number;
  readonly routersPerSite: number;
  /** Plan name (the lock records it). */
  readonly name?: string;
  /** Extra routers in the last site (an edit that only adds). */
  readonly extraRouters?: number;
  /** Name prefix of the extra routers, so that two edits can add different ones. */
  readonly extraPrefix?: string;
}

/** The plan as YAML text. Addresses from 5f00::/16 (RFC 9602). */
export function gridPlan(o: GridOptions): string {
  const groups: Record<string, object> = {};
  const nodes: { name: string; place: string }[] = [];
  const links: { ends: string[]; protection?: string }[] = [];
  for (let s = 1; s <= o.sites; s++) {
    groups[`reach${s}`] = {};
    const count = o.routersPerSite + (s === o.sites ? (o.extraRouters ?? 0) : 0);
    for (let r = 1; r <= count; r++) {
      const name = r > o.routersPerSite ? `reach${s}-${o.extraPrefix ?? "x"}${r}` : `reach${s}-r${r}`;
      nodes.push({ name, place: `reach${s}` });
      if (r > 1) links.push({ ends: [nodes[nodes.length - 2]!.name, name], protection: "both" });
    }
    if (s > 1) links.push({ ends: [`reach${s - 1}-r1`, `reach${s}-r1`] });
  }
  return stringify({
    sidcarve: 1,
    plan: o.name ?? "millrace-grid",
    operator: "Millrace Canal Networks (invented for tests)",
    levels: [
      { name: "reach", bits: 8, reserved: [0] },
      { name: "router", bits: 8, reserved: [0] },
    ],
    blocks: [{ name: "canal", prefix: "5f00:0:3300::/48", structure: { node: 16, function: 16, argument: 0 } }],
    "end-sids": [{ flavors: [] }, { flavors: ["PSP", "USD"] }],
    groups,
    nodes,
    links,
    vrfs: [{ name: "locks", families: ["ipv4", "ipv6"], mode: "split", pes: nodes.map((n) => n.name) }],
  });
}
