/**
 * The space, summary and completeness rules work on the packed table (ctx.packed); their readable
 * reference is the same rules written on the object views (reference-rules.ts). Both must give the
 * same findings, to the letter, on random tables (read both ways, with and without a plan) and on
 * allocated plans.
 *
 * Compared: every rule of these areas whose algorithm the port changed (REFERENCE_RULES:
 * locator-outside-block, reserved-space, documentation-space, edge-filtering,
 * infrastructure-collision, longest-match-theft, block-aggregation, anycast-mismatch, missing-end,
 * missing-endx, missing-vrf-sid, capacity, summary-leak, summary-unclean). Not compared:
 * summary-overlap, whose check reads only the plan's groups and is the same code before and after
 * the port (a copy of it could not differ). The references take their metadata from the real rules.
 */
import { readFileSync } from "node:fs";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { allocate } from "../../../src/alloc/allocate.js";
import { inputFromPacked, runLint } from "../../../src/lint/engine.js";
import { inputFromAllocation, inputFromTable } from "../../../src/lint/input.js";
import { ruleById } from "../../../src/lint/rules/index.js";
import type { LintInput, Rule } from "../../../src/lint/types.js";
import { formatAddr, parseAddr } from "../../../src/net/text.js";
import type { Plan } from "../../../src/plan/model.js";
import { readCsvPacked } from "../../../src/sid/packed.js";
import { readCsvTable } from "../../../src/sid/table-read.js";
import { TODAY, loadPlan, smallPlan } from "../harness.js";
import { REFERENCE_RULES } from "./reference-rules.js";

const PAIRS: [Rule, Rule][] = REFERENCE_RULES.map((ref) => [ref, ruleById(ref.meta.id)!]);

/** Per rule, how many inputs the reference found something in (the random tables must reach every rule). */
const seen = new Map<string, number>();

const findings = (input: () => LintInput, rule: Rule) => {
  const r = runLint(input(), [rule]);
  return JSON.stringify(r.findings);
};

/** Every rule gives the reference's findings on this input (made fresh for each run). */
function expectSame(inputs: { name: string; make: () => LintInput }[], reference: () => LintInput): void {
  for (const [ref, rule] of PAIRS) {
    const want = findings(reference, ref);
    if (want !== "[]") seen.set(ref.meta.id, (seen.get(ref.meta.id) ?? 0) + 1);
    for (const { name, make } of inputs) {
      const got = findings(make, rule);
      if (got !== want) expect.fail(`${rule.meta.id} (${name}):\nreference ${want}\npacked    ${got}`);
    }
  }
}

const addr = (text: string): bigint => {
  const r = parseAddr(text);
  if (!r.ok) throw new Error(text);
  return r.value;
};

// Locators (some nested, some sharing a prefix with host bits, several outside the plan's block)
// and the space SIDs are drawn from: the SRv6 range, documentation, link-local, unique-local,
// global unicast, IPv4-mapped.
const LOCATORS = [
  "5f00:0:100:1::/64",
  "5f00:0:100:2::/64",
  "5f00:0:100:2::1/64",
  "5f00:0:100::/56",
  "5f00:0:100:ff00::/64",
  "5f00:0:300:1::/64",
  "5f00:1:1::/48",
  "5f00:1:101::/48",
  "5f00:1:2::/48",
  "2001:db8:1:1::/64",
  "fe80::/64",
  "fc00:1:2::/48",
  "2a00:1:2:3::/64",
];
const STRAY_BASES = ["::ffff:a00:0", "fe80:0:0:1::", "2001:db8:9::", "5f00:0:100:7::", "5f00:0:300:9::", "3fff:1::", "2002::", "ff02::", "::", "5f00:1:2::"];
const NODES = ["r1", "r2", "r3", "r4", "A-0"];
const BEHAVIORS = ["End", "End.X", "End.DT4", "End.DT6", "End.DT46", "End.B6.Encaps", "Custom.Thing"];
const FLAVORS = ["", "PSP", "PSP+USD", "USD+PSP", "NEXT-CSID"];
const CODEPOINTS = ["", "1", "5", "19", "63", "65000"];
const STRUCTURES = [",,,", "48,16,16,0", "32,16,16,64", "32,32,16,0", "64,0,16,0", "0,0,0,0"];
const CONTEXTS = ["", "neighbor=r2", "neighbor=r1;interface=eth1", "neighbor=r3;interface=eth2", "vrf=shops", "vrf=meters"];

const rowArb = fc.record({
  node: fc.constantFrom(...NODES),
  algorithm: fc.constantFrom("0", "0", "128", ""),
  locator: fc.nat(LOCATORS.length), // LOCATORS.length: no locator
  stray: fc.nat(STRAY_BASES.length + 3), // >= STRAY_BASES.length: the SID lies under its locator
  fn: fc.constantFrom(0n, 1n, 2n, 0xe000n, 0x101n),
  low: fc.nat(3),
  behavior: fc.constantFrom(...BEHAVIORS),
  flavors: fc.constantFrom(...FLAVORS),
  codepoint: fc.constantFrom(...CODEPOINTS),
  structure: fc.constantFrom(...STRUCTURES),
  context: fc.constantFrom(...CONTEXTS),
});

type RowSpec = typeof rowArb extends fc.Arbitrary<infer T> ? T : never;

/** A CSV table; `columns` leaves out the locator or structure columns. */
function tableCsv(rows: readonly RowSpec[], columns: "all" | "no-locator" | "no-structure"): string {
  const head = ["node", "algorithm", ...(columns === "no-locator" ? [] : ["locator"]), "sid", "behavior", "flavors", "codepoint", "function", ...(columns === "no-structure" ? [] : ["block_bits", "node_bits", "function_bits", "argument_bits"]), "context"];
  const lines = [head.join(",")];
  for (const r of rows) {
    const loc = r.locator < LOCATORS.length ? LOCATORS[r.locator]! : "";
    let sid: bigint;
    if (r.stray < STRAY_BASES.length || loc === "") sid = addr(STRAY_BASES[r.stray % STRAY_BASES.length]!) + BigInt(r.low);
    else {
      const [a, len] = loc.split("/");
      const base = addr(a!) & ~((1n << BigInt(128 - Number(len))) - 1n);
      sid = base + (r.fn << 48n) + BigInt(r.low);
    }
    const cells = [r.node, r.algorithm, ...(columns === "no-locator" ? [] : [loc]), formatAddr(sid), r.behavior, r.flavors, r.codepoint, `0x${r.fn.toString(16)}`, ...(columns === "no-structure" ? [] : r.structure.split(",")), r.context];
    lines.push(cells.join(","));
  }
  return lines.join("\n") + "\n";
}

/** Plans for intent: infrastructure, anycast, VRFs and summaries on the small plan; a compressed block. */
const PLANS: Record<string, Plan> = {
  intent: loadPlan(
    smallPlan({
      infrastructure: [
        { name: "links", prefix: "5f00:0:100:ff00::/56", kind: "link" },
        { name: "loops", prefix: "2001:db8:9::/48", kind: "link" },
        { name: "mapped", prefix: "::ffff:0:0/96", kind: "link" },
      ],
      anycast: [{ name: "edge", place: "quay" }],
      nodes: [
        { name: "r1", place: "quay", anycast: ["edge"] },
        { name: "r2", place: "quay", anycast: ["edge"] },
        { name: "r3", place: "mill" },
        { name: "r4", place: "mill" },
      ],
      links: [{ ends: ["r1", "r2"] }, { ends: ["r2", "r3"] }, { ends: ["r3", "r4"] }],
      vrfs: [
        { name: "shops", families: ["ipv4", "ipv6"], mode: "combined", pes: ["r1", "r3"] },
        { name: "meters", families: ["ipv4"], pes: ["r2", "r4"] },
      ],
      groups: { quay: { summary: "5f00:0:100::/56" }, mill: { summary: "5f00:0:100::/57" } },
      lint: { production: true },
    }),
  ),
  compressed: loadPlan(
    smallPlan({ blocks: [{ name: "c", prefix: "5f00:1::/32", compression: { flavor: "next-csid", "csid-bits": 16, "global-pool": ["0x0001-0x0002", "0x0101"], "local-pool": ["0xe000-0xe001"] } }], lint: { "capacity-threshold": 0.3 } }),
  ),
};

describe("packed space, summary and completeness rules = the object-view reference", () => {
  it("on random CSV tables, without a plan and with one, read both ways", () => {
    fc.assert(
      fc.property(fc.array(rowArb, { minLength: 0, maxLength: 30 }), fc.constantFrom("all" as const, "no-locator" as const, "no-structure" as const), fc.constantFrom(undefined, "intent", "compressed"), (rows, columns, planName) => {
        const text = tableCsv(rows, columns);
        const plan = planName === undefined ? undefined : PLANS[planName];
        const bytes = new TextEncoder().encode(text);
        const objects = () => inputFromTable(readCsvTable(text), "table.csv", TODAY, plan);
        const packed = () => inputFromPacked(readCsvPacked(bytes), "table.csv", TODAY, plan);
        expectSame(
          [
            { name: "packed reader", make: packed },
            { name: "object reader", make: objects },
          ],
          objects,
        );
      }),
      { numRuns: 300 },
    );
    // the generator reaches every rule (else the comparison above proves little)
    expect(PAIRS.map(([r]) => r.meta.id).filter((id) => !seen.has(id))).toEqual([]);
  });

  // Edges the random tables reach seldom; each must match the reference too.
  const H = "node,algorithm,locator,sid,behavior,flavors,codepoint,function,block_bits,node_bits,function_bits,argument_bits,context";
  const EDGES: { name: string; csv: string[]; plan?: keyof typeof PLANS }[] = [
    {
      name: "a PE's decapsulation SIDs under another algorithm, listed in address order, not row order",
      csv: [H, "r1,128,5f00:0:100:9::/64,5f00:0:100:9:2::,End.DT6,,,0x2,,,,,vrf=shops", "r1,128,5f00:0:100:9::/64,5f00:0:100:9:1::,End.DT4,,,0x1,,,,,vrf=shops"],
      plan: "intent",
    },
    {
      name: "the same stray SID on two nodes, IPv4-mapped and link-local strays, no locator column",
      csv: ["node,sid,behavior", "r2,::ffff:a00:1,End", "r1,::ffff:a00:1,End", "r1,fe80::1,End", "r1,fe80::2,End.X", "r3,2001:db8:9::1,End"],
    },
    {
      name: "the same strays with the plan's infrastructure",
      csv: ["node,sid,behavior", "r2,::ffff:a00:1,End", "r1,::ffff:a00:1,End", "r1,fe80::1,End", "r3,2001:db8:9::1,End", "r3,2001:db8:9::,End"],
      plan: "intent",
    },
    {
      name: "several nodes share a locator prefix, one writes it with host bits",
      csv: [H, "r2,0,5f00:0:100:ff::1/64,5f00:0:100:ff:1::,End,,,0x1,48,16,16,0,", "r1,0,5f00:0:100:ff::/64,5f00:0:100:ff:2::,End,,,0x2,48,16,16,0,", "r3,0,5f00:0:100:ff::/64,5f00:0:100:ff:1::,End,,,0x1,48,16,16,0,"],
    },
    {
      name: "SIDs outside every locator, next to each other, with a plan (units of single addresses)",
      csv: ["node,sid,behavior", "r1,5f00:0:300:9::1,End", "r1,5f00:0:300:9::2,End", "r2,5f00:0:300:9::3,End", "r2,5f00:0:400::ffff,End", "r2,5f00:0:400::1:0,End"],
      plan: "intent",
    },
  ];
  it.each(EDGES)("on a table: $name", ({ csv, plan: planName }) => {
    const text = csv.join("\n") + "\n";
    const plan = planName === undefined ? undefined : PLANS[planName];
    const objects = () => inputFromTable(readCsvTable(text), "table.csv", TODAY, plan);
    const packed = () => inputFromPacked(readCsvPacked(new TextEncoder().encode(text)), "table.csv", TODAY, plan);
    expectSame(
      [
        { name: "packed reader", make: packed },
        { name: "object reader", make: objects },
      ],
      objects,
    );
  });

  it("on allocated plans", () => {
    const plans = [
      ...Object.values(PLANS),
      loadPlan(readFileSync(new URL("../../../sample-plans/harbourline-metro.yaml", import.meta.url), "utf8")),
      loadPlan(readFileSync(new URL("../../../sample-plans/tessaline-backbone.yaml", import.meta.url), "utf8")),
    ];
    for (const plan of plans) {
      const r = allocate(plan, undefined);
      if (!r.ok) throw new Error(`${plan.name} does not allocate`);
      const input = () => inputFromAllocation(r.allocation, TODAY);
      expectSame([{ name: `allocation of ${plan.name}`, make: input }], input);
    }
  });
});
