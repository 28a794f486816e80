/**
 * Property: random byte-level and token-level mutations of every sample plan never crash the
 * loader. `loadPlanBytes` must return a plan or located diagnostics, and never throw, whatever
 * bytes it is given. Fixed seeds, so every run tries the same inputs (counts in cases.ts).
 */
import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { loadPlanBytes } from "../../src/plan/load.js";
import { firstInvalidUtf8 } from "../../src/plan/source.js";
import { MUTATION_SEED, mutationRuns } from "./cases.js";

const SAMPLES = new URL("../../sample-plans/", import.meta.url).pathname;
const plans = readdirSync(SAMPLES)
  .filter((f) => /\.ya?ml$/.test(f))
  .sort()
  .map((f) => ({ file: f, bytes: new Uint8Array(readFileSync(join(SAMPLES, f))) }));


/** What the loader gave, checked: a plan, or at least one diagnostic, each with a code, a message and the file. */
function checkLoad(bytes: Uint8Array, file: string): void {
  const r = loadPlanBytes(bytes, file);
  if (r.ok) {
    expect(typeof r.plan.name).toBe("string");
    return;
  }
  expect(r.diagnostics.length).toBeGreaterThan(0);
  for (const d of r.diagnostics) {
    expect(d.code).toMatch(/^[a-z]+\/[A-Za-z-]+$/);
    expect(d.message.trim()).not.toBe("");
    expect(d.location.file).toBe(file);
  }
}

// ---- byte-level mutations

type ByteOp =
  | { readonly op: "flip"; readonly at: number; readonly bit: number }
  | { readonly op: "set"; readonly at: number; readonly byte: number }
  | { readonly op: "insert"; readonly at: number; readonly bytes: readonly number[] }
  | { readonly op: "delete"; readonly at: number; readonly len: number }
  | { readonly op: "duplicate"; readonly at: number; readonly len: number }
  | { readonly op: "truncate"; readonly at: number };

const position = fc.nat({ max: 1 << 20 });
const byteOp: fc.Arbitrary<ByteOp> = fc.oneof(
  fc.record({ op: fc.constant("flip" as const), at: position, bit: fc.nat({ max: 7 }) }),
  fc.record({ op: fc.constant("set" as const), at: position, byte: fc.constantFrom(0x00, 0x09, 0x0a, 0x0d, 0x22, 0x26, 0x2a, 0x3a, 0x5b, 0x7b, 0x7f, 0x80, 0xc0, 0xef, 0xfe, 0xff) }),
  fc.record({ op: fc.constant("insert" as const), at: position, bytes: fc.array(fc.integer({ min: 0, max: 255 }), { minLength: 1, maxLength: 8 }) }),
  fc.record({ op: fc.constant("delete" as const), at: position, len: fc.integer({ min: 1, max: 64 }) }),
  fc.record({ op: fc.constant("duplicate" as const), at: position, len: fc.integer({ min: 1, max: 256 }) }),
  fc.record({ op: fc.constant("truncate" as const), at: position }),
);

function applyBytes(src: Uint8Array, ops: readonly ByteOp[]): Uint8Array {
  let b = [...src];
  for (const o of ops) {
    const at = b.length === 0 ? 0 : o.at % b.length;
    switch (o.op) {
      case "flip":
        if (b.length) b[at] = b[at]! ^ (1 << o.bit);
        break;
      case "set":
        if (b.length) b[at] = o.byte;
        break;
      case "insert":
        b.splice(at, 0, ...o.bytes);
        break;
      case "delete":
        b.splice(at, o.len);
        break;
      case "duplicate":
        b.splice(at, 0, ...b.slice(at, at + o.len));
        break;
      case "truncate":
        b = b.slice(0, at);
        break;
    }
  }
  return new Uint8Array(b);
}

// ---- token-level mutations

/** YAML-ish tokens: runs of spaces, line ends, punctuation, quoted strings, and words. */
function tokenize(text: string): string[] {
  return text.match(/\r?\n|[ \t]+|"(?:[^"\\\n]|\\.)*"|'[^'\n]*'|[[\]{}:,#&*!|>-]|[^\s[\]{}:,#&*!|>"'-]+/g) ?? [];
}

/** Tokens a hostile edit might bring in: bad numbers, addresses, YAML tags and anchors, control characters. */
const HOSTILE_TOKENS = [
  "-1", "0.5", "1e400", "-0", "0x", "0xfffffffffffffffffffffffffffffffff", "123456789012345678901234567890123456789012",
  "::ffff:192.0.2.1", "192.0.2.0/24", "5f00::%eth0/48", "::/0", "5f00::/129", "5f00::/-1", "fe80::1%25lo", ":::", "5f00:::1",
  "&a", "*a", "*missing", "<<: *a", "!!binary", "!!js/function", "!!python/object", "!custom", "~", "null", "true", ".nan", ".inf",
  "[", "]", "{", "}", ":", ", ", "- ", "? ", "|", ">", "---", "...", "%YAML 1.2", "#", '"', "'", "`", "@", "\\",
  "\t", "\r", "\r\n", "\u0000", "\ufeff", "\u2028", "\u0085", "é", "名前", "\ud83d\ude00", "../..", "CON", "=cmd", "x".repeat(200),
];

type TokenOp =
  | { readonly op: "delete"; readonly at: number }
  | { readonly op: "duplicate"; readonly at: number }
  | { readonly op: "swap"; readonly at: number; readonly with: number }
  | { readonly op: "replace"; readonly at: number; readonly token: string }
  | { readonly op: "insert"; readonly at: number; readonly token: string }
  | { readonly op: "copy"; readonly at: number; readonly from: number };

const token = fc.oneof(fc.constantFrom(...HOSTILE_TOKENS), fc.string({ maxLength: 6 }));
const tokenOp: fc.Arbitrary<TokenOp> = fc.oneof(
  fc.record({ op: fc.constant("delete" as const), at: position }),
  fc.record({ op: fc.constant("duplicate" as const), at: position }),
  fc.record({ op: fc.constant("swap" as const), at: position, with: position }),
  fc.record({ op: fc.constant("replace" as const), at: position, token }),
  fc.record({ op: fc.constant("insert" as const), at: position, token }),
  fc.record({ op: fc.constant("copy" as const), at: position, from: position }),
);

function applyTokens(src: readonly string[], ops: readonly TokenOp[]): string {
  const t = [...src];
  for (const o of ops) {
    if (t.length === 0) t.push("");
    const at = o.at % t.length;
    switch (o.op) {
      case "delete":
        t.splice(at, 1);
        break;
      case "duplicate":
        t.splice(at, 0, t[at]!);
        break;
      case "swap": {
        const j = o.with % t.length;
        [t[at], t[j]] = [t[j]!, t[at]!];
        break;
      }
      case "replace":
        t[at] = o.token;
        break;
      case "insert":
        t.splice(at, 0, o.token);
        break;
      case "copy":
        t.splice(at, 0, t[o.from % t.length]!);
        break;
    }
  }
  return t.join("");
}

describe("mutated sample plans never crash the loader", () => {
  it("finds sample plans to mutate, and each loads unmutated", () => {
    expect(plans.length).toBeGreaterThan(0);
    for (const p of plans) {
      const r = loadPlanBytes(p.bytes, p.file);
      expect(r.ok, p.file).toBe(true);
    }
  });

  for (const [i, p] of plans.entries()) {
    const runs = mutationRuns(p.bytes.length);
    it(`${p.file}: ${runs.bytes} runs of 1-6 byte edits (bit flips, bad bytes, inserts, deletes, copies, truncation)`, () => {
      fc.assert(
        fc.property(fc.array(byteOp, { minLength: 1, maxLength: 6 }), (ops) => checkLoad(applyBytes(p.bytes, ops), p.file)),
        { seed: MUTATION_SEED + i, numRuns: runs.bytes },
      );
    }, 120_000);

    it(`${p.file}: ${runs.tokens} runs of 1-6 token edits (hostile numbers, addresses, tags, anchors, control characters)`, () => {
      const tokens = tokenize(new TextDecoder().decode(p.bytes));
      // the tokenizer keeps every character, so an empty edit list gives the plan back
      expect(tokens.join("")).toBe(new TextDecoder().decode(p.bytes));
      fc.assert(
        fc.property(fc.array(tokenOp, { minLength: 1, maxLength: 6 }), (ops) => checkLoad(new TextEncoder().encode(applyTokens(tokens, ops)), p.file)),
        { seed: MUTATION_SEED + 100 + i, numRuns: runs.tokens },
      );
    }, 120_000);
  }
});

describe("the UTF-8 check that locates a bad byte", () => {
  it("agrees with the WHATWG decoder (TextDecoder, fatal) on 3000 byte strings rich in multi-byte edges", () => {
    // cross-check: WHATWG Encoding Standard UTF-8 decoder, as built into Node
    const edgy = fc.constantFrom(0x00, 0x41, 0x7f, 0x80, 0x8f, 0x90, 0x9f, 0xa0, 0xbf, 0xc0, 0xc1, 0xc2, 0xdf, 0xe0, 0xe1, 0xec, 0xed, 0xee, 0xef, 0xf0, 0xf1, 0xf3, 0xf4, 0xf5, 0xff);
    const bytes = fc.array(fc.oneof(edgy, fc.integer({ min: 0, max: 255 })), { maxLength: 24 }).map((a) => new Uint8Array(a));
    fc.assert(
      fc.property(bytes, (b) => {
        let ok = true;
        try {
          new TextDecoder("utf-8", { fatal: true }).decode(b);
        } catch {
          ok = false;
        }
        const at = firstInvalidUtf8(b);
        expect(at === -1).toBe(ok);
        if (at >= 0) new TextDecoder("utf-8", { fatal: true }).decode(b.subarray(0, at)); // the part before it is valid
      }),
      { seed: MUTATION_SEED + 200, numRuns: 3000 },
    );
  });
});
