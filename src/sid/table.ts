/**
 * The SID table: every node's locators and SIDs with their behaviour, flavours, codepoint and
 * structure. The allocator produces one, the emitter prints one, and the linter checks one, whether
 * it came from a plan or from a live network's inventory.
 */
import type { Prefix } from "../net/prefix.js";
import type { Addr } from "../net/uint128.js";

/** The four advertised structure lengths of a SID, in bits (RFC 9352 §9, RFC 9252 §3.2.1). */
export interface SidStructure {
  readonly block: number;
  readonly node: number;
  readonly function: number;
  readonly argument: number;
}

/** What a SID is bound to: neighbor and interface, VRF and table, bridge domain, policy... */
export type SidContext = Readonly<Record<string, string>>;

export interface LocatorEntry {
  readonly prefix: Prefix;
  readonly algorithm: number;
  /** Name of the declared block it comes from; "" when unknown (bare inventory). */
  readonly block: string;
  /** Anycast group name, or "" for a node-specific locator. */
  readonly anycast: string;
}

export interface SidEntry {
  readonly sid: Addr;
  /** IANA behaviour name (e.g. "End.DT4"); any text for inventory rows that the linter will judge. */
  readonly behavior: string;
  readonly flavors: readonly string[];
  readonly codepoint: number | undefined;
  readonly algorithm: number;
  /** The locator the SID is declared under. */
  readonly locator: Prefix | undefined;
  readonly function: bigint;
  readonly structure: SidStructure | undefined;
  readonly context: SidContext;
  /** Stable identity of the binding (used by diff); "" when unknown. */
  readonly key: string;
  /** 1-based row in the source table, when the SID came from a file. */
  readonly row?: number;
}

export interface NodeTable {
  readonly node: string;
  readonly locators: readonly LocatorEntry[];
  readonly sids: readonly SidEntry[];
}

export interface SidTable {
  readonly plan: string;
  readonly nodes: readonly NodeTable[];
}

/** Render a context as `k=v;k=v` with keys sorted (the CSV form). */
export function formatContext(c: SidContext): string {
  return Object.keys(c)
    .sort()
    .map((k) => `${k}=${c[k]}`)
    .join(";");
}

/** Parse `k=v;k=v`; returns undefined when a part has no '='. */
export function parseContext(s: string): Record<string, string> | undefined {
  // no prototype: a key such as "__proto__" is kept as data, not swallowed
  const out: Record<string, string> = Object.create(null);
  if (s.trim() === "") return out;
  for (const part of s.split(";")) {
    const eq = part.indexOf("=");
    if (eq <= 0) return undefined;
    out[part.slice(0, eq).trim()] = part.slice(eq + 1).trim();
  }
  return out;
}
