/**
 * The normalised plan model: what the allocator and the linter work on, after the text has been
 * read, validated and checked for meaning. All values are numbers or bigints, never text.
 */
import type { Prefix } from "../net/prefix.js";
import type { Flavor } from "../sid/behaviors.js";
import type { Locator } from "./source.js";

/** An inclusive range of whole numbers. */
export interface ValueRange {
  readonly first: bigint;
  readonly last: bigint;
}

/** How values of one level are handed out (RFC 3531). "sequential" counts up from 0. */
export type LevelOrder = "sequential" | "leftmost" | "centremost" | "rightmost";

/** One level of the node hierarchy (e.g. region, site, router). */
export interface Level {
  readonly name: string;
  readonly bits: number;
  readonly order: LevelOrder;
  readonly reserved: readonly ValueRange[];
}

/** How SIDs under a block are laid out. */
export type Layout =
  | {
      /** RFC 8986 §3.1: locator = block + node; SID = locator + function + argument. */
      readonly kind: "classic";
      readonly blockBits: number;
      readonly nodeBits: number;
      readonly functionBits: number;
      readonly argumentBits: number;
    }
  | {
      /** RFC 9800 compressed SIDs. */
      readonly kind: "compressed";
      readonly flavor: "NEXT-CSID" | "REPLACE-CSID";
      readonly blockBits: number;
      readonly csidBits: number;
      /** Bits of the node field. Equal to csidBits for the two-C-SID layout (global node C-SID, then a local C-SID). */
      readonly nodeBits: number;
      /** Bits of the function field: csidBits (two-C-SID layout) or csidBits - nodeBits (one C-SID holds node and function). */
      readonly functionBits: number;
      /** True when the node C-SID and the function C-SID are separate C-SIDs (NEXT-CSID, or REPLACE-CSID with node bits = C-SID bits). */
      readonly twoCsid: boolean;
      readonly gib: readonly ValueRange[];
      readonly lib: readonly ValueRange[];
      /** Argument bits for End.DT2M (Arg.FE2) under plain behaviours. */
      readonly argumentBits: number;
    };

export interface Block {
  readonly name: string;
  readonly index: number;
  readonly prefix: Prefix;
  readonly algorithms: readonly number[];
  /** Leading node bits that select the algorithm when a block serves several. */
  readonly algorithmBits: number;
  /** Group paths this block serves (empty = every node). */
  readonly groups: readonly string[];
  readonly layout: Layout;
}

export interface Group {
  readonly path: string; // "north/quay"
  readonly name: string;
  readonly depth: number; // 0 = first level
  readonly parent: string | undefined;
  readonly pinned: bigint | undefined;
  readonly summary: Prefix | undefined;
  readonly order: number; // position in the file
}

export type Role = "p" | "pe" | "border" | "rr" | "other";

export interface Msd {
  readonly maxSl?: number;
  readonly maxEndPop?: number;
  readonly maxHEncaps?: number;
  readonly maxEndD?: number;
}

export interface PlanNode {
  readonly name: string;
  readonly index: number;
  readonly place: string; // group path
  readonly role: Role;
  readonly pinned: bigint | undefined;
  readonly algorithms: readonly number[];
  readonly anycast: readonly string[];
  readonly msd: Msd;
}

export interface AnycastGroup {
  readonly name: string;
  readonly place: string;
  readonly pinned: bigint | undefined;
  readonly algorithms: readonly number[];
  readonly members: readonly string[];
}

export interface LinkEnd {
  readonly node: string;
  readonly iface: string | undefined;
  readonly pinned: bigint | undefined;
  readonly pinnedProtected: bigint | undefined;
}

export interface Link {
  readonly index: number;
  readonly name: string;
  readonly ends: readonly [LinkEnd, LinkEnd];
  readonly protection: "unprotected" | "protected" | "both";
  readonly algorithms: readonly number[] | undefined;
}

export interface Vrf {
  readonly name: string;
  readonly table: number | undefined;
  readonly families: readonly ("ipv4" | "ipv6")[];
  readonly mode: "combined" | "split";
  readonly algorithm: number;
  readonly pes: readonly string[];
  readonly ces: readonly { name: string; pe: string; family: "ipv4" | "ipv6"; iface: string | undefined }[];
}

export interface L2Service {
  readonly name: string;
  readonly kind: "wire" | "vlan-wire" | "bridge";
  readonly algorithm: number;
  readonly attachments: readonly { node: string; iface: string | undefined; vlan: number | undefined }[];
  readonly nodes: readonly string[];
}

export interface Policy {
  readonly name: string;
  readonly node: string;
  readonly behavior: "End.B6.Encaps" | "End.B6.Encaps.Red" | "End.BM";
  readonly algorithm: number;
  readonly endpoint: string | undefined;
  readonly color: number | undefined;
}

export interface FibTable {
  readonly name: string;
  readonly table: number | undefined;
  readonly nodes: readonly string[];
  readonly flavors: readonly Flavor[];
}

export interface Infrastructure {
  readonly name: string;
  readonly prefix: Prefix;
  readonly kind: string;
}

/** Kinds of SID that draw function values from separate pools. */
export type PoolKind = "end" | "adjacency" | "service" | "l2" | "binding" | "table";
export const POOL_KINDS: readonly PoolKind[] = ["end", "adjacency", "service", "l2", "binding", "table"];

export type Severity = "off" | "info" | "warning" | "error";

export interface Waiver {
  readonly rule: string;
  readonly objects: readonly string[];
  readonly reason: string;
  readonly expires: string; // YYYY-MM-DD
  readonly index: number;
}

export interface LintSettings {
  readonly severity: Readonly<Record<string, Severity>>;
  readonly capacityThreshold: number;
  readonly production: boolean;
  readonly waivers: readonly Waiver[];
}

/** A whole plan, normalised. `locate` maps plan paths back to the source text. */
export interface Plan {
  readonly file: string;
  readonly name: string;
  readonly operator: string | undefined;
  readonly algorithms: readonly { id: number; name: string }[];
  readonly levels: readonly Level[];
  readonly blocks: readonly Block[];
  readonly groups: readonly Group[];
  readonly nodes: readonly PlanNode[];
  readonly anycast: readonly AnycastGroup[];
  readonly links: readonly Link[];
  readonly vrfs: readonly Vrf[];
  readonly l2: readonly L2Service[];
  readonly policies: readonly Policy[];
  readonly tables: readonly FibTable[];
  readonly infrastructure: readonly Infrastructure[];
  readonly endSids: readonly (readonly Flavor[])[];
  readonly adjacencyFlavors: readonly Flavor[];
  /** Explicit pools from the plan; kinds not given use the allocator's own default split. */
  readonly functionPools: Partial<Record<PoolKind, readonly ValueRange[]>>;
  readonly reservedFunctions: readonly ValueRange[];
  readonly lint: LintSettings;
  readonly locate: Locator;
}
