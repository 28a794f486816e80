/**
 * The fast reader keeps each owner's locked functions as key ranges of the lock's bytes
 * (LockedFunctions). Checked against the readable reader (JSON.parse, parseLockReadable): lookups
 * without a key string give what the Map gives, the counts per algorithm agree, the Map that fills
 * itself is the reference Map, and a hand-edited lock with a key twice is read as JSON.parse does.
 */
import { createHash } from "node:crypto";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { readLockFast } from "../../src/alloc/lock-fast.js";
import { LockedFunctions, countsByAlgorithm, keyHash, keyHashBytes } from "../../src/alloc/lock-functions.js";
import { type Lock, lockBody, parseLockReadable, serializeLock, serializeLockBytes } from "../../src/alloc/lock.js";

const rest = fc.oneof(
  { weight: 6, arbitrary: fc.constantFrom("End|plain", "End|PSP+USD", "End.X|r2||protected", "End.X|r2|ge-0|unprotected", "End.DT4|blue", "End.DX2|wire|ge-1|", "") },
  // printable ASCII that JSON writes without escapes (no quote, no backslash)
  { weight: 2, arbitrary: fc.stringMatching(/^[ !#-[\]-~]{0,12}$/) },
);
const plainKey = fc.tuple(fc.constantFrom(0, 1, 7, 128, 255, 999), rest).map(([a, r]) => `${a}|${r}`);
const oddKey = fc.constantFrom("007|End|plain", "1000|End|plain", "|End", "12", "x|y", 'say "hi"', "back\\slash", "café", "0|café", "0|tab\there");
const value = fc.oneof(fc.bigInt({ min: 0n, max: 0xffffn }), fc.bigInt({ min: 0n, max: (1n << 128n) - 1n }));
const owners = (key: fc.Arbitrary<string>) =>
  fc.uniqueArray(fc.tuple(fc.string({ minLength: 1, maxLength: 6 }), fc.uniqueArray(fc.tuple(key, value), { selector: ([k]) => k, maxLength: 12 }).map((es) => new Map(es))), { selector: ([o]) => o, maxLength: 6 }).map((es) => new Map(es));
const lockWith = (fns: Map<string, Map<string, bigint>>): Lock => ({ plan: "p", layout: "l", groups: new Map(), nodes: new Map(), functions: fns, retired: [] });

/** JSON text without the whitespace between tokens (a small reference of the lock format's digest rule). */
function compactText(t: string): string {
  let out = "";
  let inString = false;
  for (let i = 0; i < t.length; i++) {
    const c = t[i]!;
    if (inString) {
      out += c;
      if (c === "\\") out += t[++i];
      else if (c === '"') inString = false;
    } else if (!/\s/.test(c)) {
      out += c;
      if (c === '"') inString = true;
    }
  }
  return out;
}

/** The lock with each owner's functions as an ordinary Map (made from what the reader gave). */
function plainMaps(lock: Lock): Lock {
  return { ...lock, functions: new Map([...lock.functions].map(([owner, m]) => [owner, new Map(m)])) };
}

function readBoth(lock: Lock): { fast: Lock; ref: Lock } {
  const text = serializeLock(lock);
  const fast = readLockFast(Buffer.from(text));
  const ref = parseLockReadable(text, "x.lock.json", "p");
  expect(fast).toBeDefined();
  expect(ref.ok).toBe(true);
  if (!fast || !ref.ok) throw new Error("unreadable");
  return { fast, ref: ref.lock };
}

describe("keyHash", () => {
  it("hashes a string as keyHashBytes hashes its ASCII bytes", () => {
    fc.assert(
      fc.property(fc.stringMatching(/^[ -~]{0,40}$/), fc.nat(8), (s, pad) => {
        const b = Buffer.from("x".repeat(pad) + s + "y");
        expect(keyHash(s)).toBe(keyHashBytes(b, pad, pad + s.length));
      }),
    );
  });
});

describe("LockedFunctions (the fast reader's functions) against the readable reader's Maps", () => {
  it("answers lookups, sizes and counts per algorithm without filling, as the Map does", () => {
    fc.assert(
      fc.property(owners(plainKey), fc.array(plainKey, { maxLength: 6 }), (fns, probes) => {
        const { fast, ref } = readBoth(lockWith(fns));
        for (const [owner, m] of fast.functions) {
          const want = ref.functions.get(owner)!;
          expect(m).toBeInstanceOf(LockedFunctions);
          const lf = m as LockedFunctions;
          expect(lf.size).toBe(want.size);
          const counts = new Map<number, number>();
          for (const k of want.keys()) counts.set(Number(k.split("|")[0]), (counts.get(Number(k.split("|")[0])) ?? 0) + 1);
          expect(countsByAlgorithm(lf)).toEqual(counts);
          expect(lf.isFilled).toBe(false);
          for (const k of [...want.keys(), ...probes]) {
            const bar = k.indexOf("|");
            const algo = Number(k.slice(0, bar));
            const r = k.slice(bar + 1);
            expect(lf.lookup(algo, r, keyHash(r))).toBe(want.get(k));
            // the same rest under another algorithm is another key
            expect(lf.lookup(algo + 1, r, keyHash(r))).toBe(want.get(`${algo + 1}|${r}`));
          }
          // filled, it is the reference Map, in the same order; lookups still agree
          expect([...lf]).toEqual([...want]);
          expect(lf.isFilled).toBe(true);
          expect(countsByAlgorithm(lf)).toEqual(counts);
          for (const k of want.keys()) expect(lf.lookup(Number(k.split("|")[0]), k.slice(k.indexOf("|") + 1), 0)).toBe(want.get(k));
        }
      }),
      { numRuns: 300 },
    );
  });

  it("reads an owner with an unusual key as an ordinary Map, the same as the reference", () => {
    fc.assert(
      fc.property(owners(fc.oneof(plainKey, oddKey)), (fns) => {
        const { fast, ref } = readBoth(lockWith(fns));
        for (const [owner, m] of fast.functions) {
          const want = ref.functions.get(owner)!;
          const odd = [...want.keys()].some((k) => !/^(0|[1-9][0-9]{0,2})\|[ -~]*$/.test(k) || /["\\]/.test(k));
          if (odd) expect(m).not.toBeInstanceOf(LockedFunctions);
          expect([...m]).toEqual([...want]);
        }
      }),
      { numRuns: 300 },
    );
  });

  it("behaves as a Map once changed: set, delete, clear", () => {
    const { fast } = readBoth(lockWith(new Map([["r1", new Map([["0|End|plain", 1n], ["0|End.X|r2||protected", 0x40n]])]])));
    const lf = fast.functions.get("r1") as Map<string, bigint>;
    lf.set("1|End|plain", 2n);
    expect(lf.size).toBe(3);
    expect(lf.delete("0|End|plain")).toBe(true);
    expect([...lf.keys()]).toEqual(["0|End.X|r2||protected", "1|End|plain"]);
    expect((lf as LockedFunctions).lookup(1, "End|plain", keyHash("End|plain"))).toBe(2n);
    lf.clear();
    expect(lf.size).toBe(0);
    expect((lf as LockedFunctions).lookup(0, "End.X|r2||protected", keyHash("End.X|r2||protected"))).toBeUndefined();
  });

  it("reads a key given twice (a hand edit with its digest made again) as JSON.parse does: the last value wins", () => {
    const text = serializeLock(lockWith(new Map([["r1", new Map([["0|End|plain", 1n], ["0|End.X|a||protected", 2n]])]])));
    const edited = text.replace('"0|End|plain": "0x1"', '"0|End|plain": "0x1",\n      "0|End|plain": "0x7"');
    expect(edited).not.toBe(text);
    // the digest covers the compact form of everything before the digest member, closed with "}"
    const compact = compactText(edited.slice(0, edited.lastIndexOf(',\n  "digest"'))) + "}";
    const digest = "sha256:" + createHash("sha256").update(compact).digest("hex");
    const withDigest = edited.replace(/"sha256:[0-9a-f]+"/, JSON.stringify(digest));
    const fast = readLockFast(Buffer.from(withDigest));
    expect(fast).toBeDefined();
    const m = fast!.functions.get("r1")!;
    expect(m).not.toBeInstanceOf(LockedFunctions);
    expect([...m]).toEqual([...new Map(Object.entries(JSON.parse(withDigest).functions.r1 as Record<string, string>).map(([k, v]) => [k, BigInt(v)]))]);
    expect(m.get("0|End|plain")).toBe(7n);
  });
  it("is written back by copying its bytes when unchanged and in order, and the ordinary way otherwise: the bytes of JSON.stringify either way", () => {
    /** The readable reference writer: build the object, stringify it twice. */
    const reference = (lock: Lock) => {
      const b = lockBody(lock);
      return JSON.stringify({ ...b, digest: "sha256:" + createHash("sha256").update(JSON.stringify(b)).digest("hex") }, null, 2) + "\n";
    };
    fc.assert(
      fc.property(owners(plainKey), fc.nat(), fc.constantFrom("as-read", "reordered", "changed"), (fns, pick, how) => {
        let text = serializeLock(lockWith(fns));
        if (how === "reordered") {
          // two members of one owner swapped, the digest made again: the same lock, its keys out of order
          const lines = text.split("\n");
          const members = lines.map((l, k) => (/^ {6}"/.test(l) && /^ {6}"/.test(lines[k + 1] ?? "") ? k : -1)).filter((k) => k >= 0);
          if (members.length === 0) return;
          const k = members[pick % members.length]!;
          const a = lines[k]!.replace(/,$/, "");
          const b = lines[k + 1]!.replace(/,$/, "");
          lines[k] = b + ",";
          lines[k + 1] = lines[k + 1]!.endsWith(",") ? a + "," : a;
          const edited = lines.join("\n");
          const compact = compactText(edited.slice(0, edited.lastIndexOf(',\n  "digest"'))) + "}";
          text = edited.replace(/"sha256:[0-9a-f]+"/, JSON.stringify("sha256:" + createHash("sha256").update(compact).digest("hex")));
        }
        const fast = readLockFast(Buffer.from(text));
        expect(fast).toBeDefined();
        if (!fast) return;
        if (how === "as-read") for (const m of fast.functions.values()) if (m.size > 1) expect((m as LockedFunctions).inTextOrder()).toBe(true);
        if (how === "changed") {
          const first = [...fast.functions.values()][pick % Math.max(1, fast.functions.size)];
          (first as Map<string, bigint> | undefined)?.set(`0|End|added-${pick}`, BigInt(pick));
        }
        // written first: the reference below reads every Map, which fills them
        const got = serializeLock(fast);
        const gotBytes = serializeLockBytes(fast);
        const want = reference(plainMaps(fast));
        expect(got).toBe(want);
        expect(gotBytes.equals(Buffer.from(want))).toBe(true);
        if (how === "as-read") expect(want).toBe(text);
      }),
      { numRuns: 300 },
    );
  });
});
