/**
 * serializeLock writes the lock text directly; the readable form is JSON.stringify of lockBody
 * with the digest (SHA-256 of the compact JSON) added. The two must give the same bytes on any
 * lock, including keys that JSON.stringify orders first (array indices) and keys it must escape.
 */
import { createHash } from "node:crypto";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { type Lock, type RetiredValue, lockBody, parseLock, parseLockReadable, serializeLock } from "../../src/alloc/lock.js";
import { readLockFast } from "../../src/alloc/lock-fast.js";
import { lockFromParts, lockToParts } from "../../src/alloc/lock-parts.js";

/** The readable reference: build the object, stringify it twice. */
function reference(lock: Lock): string {
  const b = lockBody(lock);
  const digest = "sha256:" + createHash("sha256").update(JSON.stringify(b)).digest("hex");
  return JSON.stringify({ ...b, digest }, null, 2) + "\n";
}

const name = fc.oneof(
  { weight: 5, arbitrary: fc.constantFrom("north", "north/quay", "r1", "anycast:edge", "0|End|plain", "0|End.X|r2||protected", "128|End.DT4|blue") },
  { weight: 2, arbitrary: fc.constantFrom("0", "7", "17", "007", "-1", "1.5", "4294967294", "4294967295", "99999999999") },
  { weight: 1, arbitrary: fc.constantFrom("__proto__", 'say "hi"', "back\\slash", "tab\there", "line\nbreak", "café", "\u2028", "😀", "") },
);
const value = fc.oneof(fc.bigInt({ min: 0n, max: 0xffffn }), fc.bigInt({ min: 0n, max: (1n << 128n) - 1n }));
const valueMap = fc.uniqueArray(fc.tuple(name, value), { selector: ([k]) => k, maxLength: 8 }).map((es) => new Map(es));
const retired: fc.Arbitrary<RetiredValue> = fc.record({ kind: fc.constantFrom("group", "node", "function"), space: name, value, was: name });
const lockArb: fc.Arbitrary<Lock> = fc.record({
  plan: name,
  layout: fc.constantFrom("levels=site:8,router:8;blocks=b=5f00::/48:classic:16/16/0:a0:0", ""),
  groups: valueMap,
  nodes: fc.uniqueArray(fc.tuple(name, name, value), { selector: ([k]) => k, maxLength: 6 }).map((es) => new Map(es.map(([k, place, v]) => [k, { place, value: v }]))),
  functions: fc.uniqueArray(fc.tuple(name, valueMap), { selector: ([k]) => k, maxLength: 6 }).map((es) => new Map(es)),
  retired: fc.array(retired, { maxLength: 5 }),
});

describe("serializeLock", () => {
  it("gives the bytes of JSON.stringify over the lock's body, digest included", () => {
    fc.assert(
      fc.property(lockArb, (lock) => {
        expect(serializeLock(lock)).toBe(reference(lock));
      }),
      { numRuns: 400 },
    );
  });
  it("writes an empty lock as the reference does", () => {
    const empty: Lock = { plan: "p", layout: "l", groups: new Map(), nodes: new Map(), functions: new Map(), retired: [] };
    expect(serializeLock(empty)).toBe(reference(empty));
  });
  it("reads back what it wrote (the digest matches)", () => {
    fc.assert(
      fc.property(lockArb, (lock) => {
        const r = parseLock(serializeLock(lock), "x.lock.json", lock.plan);
        expect(r.ok).toBe(true);
        if (r.ok) expect(serializeLock(r.lock)).toBe(serializeLock(lock));
      }),
      { numRuns: 200 },
    );
  });
});

/** The lock with each owner's functions as an ordinary Map (the fast reader's fill themselves when read; toEqual compares classes). */
function plainMaps(lock: Lock): Lock {
  return { ...lock, functions: new Map([...lock.functions].map(([owner, m]) => [owner, new Map(m)])) };
}

/** What a read gives, comparable: the lock's text again, or the diagnostics' codes. */
function outcome(r: ReturnType<typeof parseLockReadable>): string {
  return r.ok ? serializeLock(r.lock) : "fail:" + r.diagnostics.map((d) => d.code).join(",");
}

describe("readLockFast (the fast reader) against parseLockReadable (JSON.parse, the reference)", () => {
  it("reads every intact lock to the same maps, in the same order", () => {
    fc.assert(
      fc.property(lockArb, (lock) => {
        const text = serializeLock(lock);
        const fast = readLockFast(Buffer.from(text));
        expect(fast).toBeDefined();
        const ref = parseLockReadable(text, "x.lock.json", lock.plan);
        expect(ref.ok).toBe(true);
        if (!ref.ok || !fast) return;
        for (const k of ["groups", "nodes", "functions"] as const) expect([...fast[k].keys()]).toEqual([...ref.lock[k].keys()]);
        for (const [owner, m] of fast.functions) expect([...m.keys()]).toEqual([...ref.lock.functions.get(owner)!.keys()]);
        expect(plainMaps(fast)).toEqual(ref.lock);
      }),
      { numRuns: 300 },
    );
  });
  it("gives way (or agrees) on damaged, reformatted and hand-edited locks", () => {
    const edits = fc.oneof(
      // cut it short
      fc.nat().map((n) => (t: string) => t.slice(0, n % (t.length + 1))),
      // change one character
      fc.tuple(fc.nat(), fc.constantFrom("0", "1", "f", "F", "x", " ", "\n", '"', "\\", ",", "}", "é")).map(([n, ch]) => (t: string) => {
        const at = n % t.length;
        return t.slice(0, at) + ch + t.slice(at + 1);
      }),
      // reformat: compact, CRLF, tabs (the digest covers the compact form, so these still match)
      fc.constantFrom(
        (t: string) => JSON.stringify(JSON.parse(t)),
        (t: string) => t.replace(/\n/g, "\r\n"),
        (t: string) => t.replace(/ {2}/g, "\t"),
        (t: string) => "\ufeff" + t,
        (t: string) => t + "x",
        (t: string) => t.replace(/"0x/, '"0X'),
      ),
    );
    fc.assert(
      fc.property(lockArb, edits, (lock, edit) => {
        const text = edit(serializeLock(lock));
        expect(outcome(parseLock(text, "x.lock.json", lock.plan))).toBe(outcome(parseLockReadable(text, "x.lock.json", lock.plan)));
        expect(outcome(parseLock(Buffer.from(text), "x.lock.json", lock.plan))).toBe(outcome(parseLockReadable(text, "x.lock.json", lock.plan)));
        expect(outcome(parseLock(text, "x.lock.json", "another-plan"))).toBe(outcome(parseLockReadable(text, "x.lock.json", "another-plan")));
        // with the fast reader's answer found elsewhere (as the CLI does in a worker thread), in parts
        const bytes = Buffer.from(text);
        const fast = readLockFast(bytes);
        const carried = fast && lockFromParts(structuredClone(lockToParts(fast).parts), bytes);
        expect(outcome(parseLock(bytes, "x.lock.json", lock.plan, { lock: carried }))).toBe(outcome(parseLockReadable(text, "x.lock.json", lock.plan)));
      }),
      { numRuns: 600 },
    );
  });
});

describe("a lock in parts (read in a worker thread, used in the main one)", () => {
  it("comes back as the lock the fast reader gave, through a structured clone that moves its columns", () => {
    fc.assert(
      fc.property(lockArb, (lock) => {
        const text = serializeLock(lock);
        const bytes = Buffer.from(text);
        const fast = readLockFast(bytes)!;
        const { parts, transfer } = lockToParts(fast);
        const back = lockFromParts(structuredClone(parts, { transfer }), bytes);
        const ref = parseLockReadable(text, "x.lock.json", lock.plan);
        if (!ref.ok) throw new Error("unreadable");
        expect(plainMaps(back)).toEqual(ref.lock);
        expect(serializeLock(back)).toBe(text);
        // the parts' columns were moved, not copied: the thread that sent them no longer has them
        if (parts.store) expect(parts.store.hash.length).toBe(0);
      }),
      { numRuns: 200 },
    );
  });
});
