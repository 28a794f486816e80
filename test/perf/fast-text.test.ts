/**
 * The address text core (src/net/fast.ts: parseWordsBytes, parsePrefixBytes), its string edge
 * (parseWordsInto in text.ts) and formatWords, against a readable grammar of RFC 4291 §2.2 text
 * written here, against parsePrefixParts and against ip-address, on random addresses written in
 * every form and on near-misses.
 */
import fc from "fast-check";
import { Address6 } from "ip-address";
import { describe, expect, it } from "vitest";
import { parsePrefixBytes, parseWordsBytes } from "../../src/net/fast.js";
import { formatAddr, formatAddrExpanded, formatWords, parseAddr, parsePrefixParts, parseWordsInto } from "../../src/net/text.js";
import { ALL_ONES, type Addr, fromWords, toWords } from "../../src/net/uint128.js";

const enc = new TextEncoder();

/** Values with many zero groups, so every zero-run position and length appears. */
const group = fc.oneof({ arbitrary: fc.constant(0), weight: 5 }, { arbitrary: fc.integer({ min: 1, max: 0xf }), weight: 1 }, { arbitrary: fc.integer({ min: 0, max: 0xffff }), weight: 4 });
const addrArb: fc.Arbitrary<Addr> = fc.oneof(
  { arbitrary: fc.array(group, { minLength: 8, maxLength: 8 }).map((g) => g.reduce((acc, v) => (acc << 16n) | BigInt(v), 0n)), weight: 8 },
  { arbitrary: fc.bigInt({ min: 0n, max: ALL_ONES }), weight: 1 },
  { arbitrary: fc.bigInt({ min: 0n, max: 0xffffffffn }).map((v) => (0xffffn << 32n) | v), weight: 1 },
);

/** One address written in a random legal form: compressed or not, leading zeros, case, dotted tail. */
const writtenArb = fc.tuple(addrArb, fc.integer({ min: 0, max: 5 }), fc.boolean()).map(([a, form, upper]) => {
  let t: string;
  const groups = formatAddrExpanded(a).split(":");
  switch (form) {
    case 0:
      t = formatAddr(a);
      break;
    case 1:
      t = groups.join(":");
      break;
    case 2:
      t = groups.map((g) => g.replace(/^0+(?=.)/, "")).join(":");
      break;
    case 3: {
      // a dotted-quad tail for the last 32 bits
      const w3 = Number(a & 0xffffffffn);
      t = `${groups.slice(0, 6).join(":")}:${w3 >>> 24}.${(w3 >>> 16) & 255}.${(w3 >>> 8) & 255}.${w3 & 255}`;
      break;
    }
    case 4:
      t = new Address6(formatAddr(a)).correctForm();
      break;
    default:
      t = formatAddr(a).replace(/(^|:)0(?=:|$)/, "$1000");
  }
  return upper ? t.toUpperCase() : t;
});

/** Text that is almost an address: one character changed, added or removed, or wrapped. */
const nearMissArb = fc.tuple(writtenArb, fc.integer({ min: 0, max: 9 }), fc.nat(), fc.constantFrom(":", ".", "g", " ", "%", "/", "0", "::", "1", "[")).map(([t, kind, at, ch]) => {
  const i = at % (t.length + 1);
  switch (kind) {
    case 0:
      return t.slice(0, i) + ch + t.slice(i);
    case 1:
      return t.slice(0, i) + t.slice(i + 1);
    case 2:
      return t.slice(0, i) + ch + t.slice(i + 1);
    case 3:
      return ` ${t}`;
    case 4:
      return `${t}/64`;
    case 5:
      return `${t}%eth0`;
    case 6:
      return `[${t}]`;
    case 7:
      return `${t}:1`;
    case 8:
      return t.replace("::", ":::");
    default:
      return t + ch;
  }
});

/**
 * RFC 4291 §2.2 text read the plain way, as the reference for the parsers: hex groups of one to
 * four digits split at ':', at most one '::' standing for one or more zero groups, and an
 * optional dotted-quad tail (decimal parts 0..255 without leading zeros) for the last 32 bits.
 */
function rfc4291(t: string): bigint | undefined {
  const octet = "(?:25[0-5]|2[0-4][0-9]|1[0-9][0-9]|[1-9]?[0-9])";
  const tail = new RegExp(`^(.*:)(${octet}(?:\\.${octet}){3})$`).exec(t);
  let head = t;
  const last: number[] = [];
  if (tail) {
    const q = tail[2]!.split(".").map(Number);
    last.push(q[0]! * 256 + q[1]!, q[2]! * 256 + q[3]!);
    // "a:b:...:1.2.3.4" drops the ':' before the quad; "a::1.2.3.4" keeps its "::"
    head = tail[1]!.endsWith("::") ? tail[1]! : tail[1]!.slice(0, -1);
  }
  const halves = head.split("::");
  if (halves.length > 2) return undefined;
  const groupsOf = (h: string) => (h === "" ? [] : h.split(":"));
  const before = groupsOf(halves[0]!);
  const after = halves.length === 2 ? groupsOf(halves[1]!) : [];
  if (![...before, ...after].every((g) => /^[0-9a-fA-F]{1,4}$/.test(g))) return undefined;
  const written = before.length + after.length + last.length;
  if (halves.length === 2 ? written > 7 : written !== 8) return undefined;
  const all = [...before.map((g) => parseInt(g, 16)), ...Array<number>(8 - written).fill(0), ...after.map((g) => parseInt(g, 16)), ...last];
  return all.reduce((acc, g) => (acc << 16n) | BigInt(g), 0n);
}

/** What ip-address makes of a text: its value, or undefined when it rejects it. */
function ipAddress(t: string): bigint | undefined {
  // ip-address accepts some forms RFC 4291 text does not (zones, prefixes); those never reach here
  // because both sides are compared only where the text has no '%', '/', '[' or space.
  try {
    return new Address6(t).bigInt();
  } catch {
    return undefined;
  }
}

/** Near misses of another kind: any text over the characters address text is made of. */
const alphabetArb = fc.array(fc.constantFrom(..."0123456789abcdefABCDEF:.", ":", ":", "."), { maxLength: 46 }).map((a) => a.join(""));

describe("parseWordsBytes and parseWordsInto", () => {
  it("accept exactly the text the readable RFC 4291 grammar accepts, with its value", () => {
    const a = new Uint32Array(4);
    const b = new Uint32Array(4);
    let accepted = 0;
    let rejected = 0;
    fc.assert(
      fc.property(fc.oneof(writtenArb, nearMissArb, alphabetArb), (t) => {
        const ref = rfc4291(t);
        const bytes = enc.encode(`,${t},`);
        const okA = parseWordsInto(t, a, 0);
        const okB = parseWordsBytes(bytes, 1, bytes.length - 1, b, 0);
        expect(okA).toBe(ref !== undefined);
        expect(okB).toBe(ref !== undefined);
        if (ref === undefined) rejected++;
        else {
          accepted++;
          expect(fromWords(a[0]!, a[1]!, a[2]!, a[3]!)).toBe(ref);
          expect([...b]).toEqual([...a]);
        }
      }),
      { seed: 4291, numRuns: 30000 },
    );
    expect(accepted).toBeGreaterThan(8000);
    expect(rejected).toBeGreaterThan(8000);
  });

  it("reject text with characters outside ASCII, whatever their low byte", () => {
    const w = new Uint32Array(4);
    // U+0130 and U+FF10 end in the bytes of '0' and the full stop: a string edge that kept only low bytes would read them
    for (const t of ["5f00::\u0130", "\uff10::1", "5f00::1\u012e2.3.4", "\u0131::"]) expect(parseWordsInto(t, w, 0)).toBe(false);
    expect(parseWordsInto("5f00::0", w, 0)).toBe(true);
  });

  it("gives the value ip-address gives (cross-check: ip-address Address6.bigInt())", () => {
    const w = new Uint32Array(4);
    let compared = 0;
    fc.assert(
      fc.property(fc.oneof(writtenArb, nearMissArb), (t) => {
        if (/[%/[\] ]/.test(t)) return;
        const bytes = enc.encode(t);
        const ours = parseWordsBytes(bytes, 0, bytes.length, w, 0) ? fromWords(w[0]!, w[1]!, w[2]!, w[3]!) : undefined;
        const ref = ipAddress(t);
        // ip-address also reads a few forms outside RFC 4291 text (e.g. leading zeros in a dotted
        // quad); where we accept, it must agree on the value.
        if (ours !== undefined) {
          compared++;
          expect(ref).toBe(ours);
        }
      }),
      { seed: 5952, numRuns: 20000 },
    );
    expect(compared).toBeGreaterThan(5000);
  });

  it("accepts exactly what parseAddr accepts on trimmed text", () => {
    const w = new Uint32Array(4);
    fc.assert(
      fc.property(fc.oneof(writtenArb, nearMissArb), (t) => {
        const bytes = enc.encode(t);
        const r = parseAddr(t);
        const ok = parseWordsBytes(bytes, 0, bytes.length, w, 0);
        if (ok) expect(r).toEqual({ ok: true, value: fromWords(w[0]!, w[1]!, w[2]!, w[3]!) });
        // parseAddr trims first, so it may accept what the byte path (which never trims) rejects
        else if (t === t.trim()) expect(r.ok).toBe(false);
      }),
      { seed: 8986, numRuns: 20000 },
    );
  });

  it("reads a range inside a larger buffer without touching the bytes around it", () => {
    const w = new Uint32Array(8).fill(7);
    const bytes = enc.encode("xx5f00:b000::1yy");
    expect(parseWordsBytes(bytes, 2, 14, w, 4)).toBe(true);
    expect([...w]).toEqual([7, 7, 7, 7, 0x5f00b000, 0, 0, 1]);
    expect(parseWordsBytes(bytes, 2, 15, w, 0)).toBe(false); // "5f00:b000::1y"
  });
});

describe("parsePrefixBytes", () => {
  const prefixArb = fc.oneof(
    fc.tuple(fc.oneof(writtenArb, nearMissArb), fc.oneof(fc.integer({ min: 0, max: 130 }).map(String), fc.constantFrom("064", "0128", "", "6 4", "x", " 64", "64 ", "1e2"))).map(([a, l]) => `${a}/${l}`),
    fc.oneof(writtenArb, nearMissArb),
    fc.constantFrom("/64", "5f00::/", "5f00::/64/64", " 5f00::/64", "5f00:: /64", "5f00::\u00a0/64", "'5f00::/64"),
  );

  it("where it accepts, parsePrefixParts gives the same address and length; where it rejects, parsePrefixParts rejects text without spaces", () => {
    const w = new Uint32Array(4);
    let accepted = 0;
    fc.assert(
      fc.property(prefixArb, (t) => {
        const bytes = enc.encode(`,${t},`);
        const len = parsePrefixBytes(bytes, 1, bytes.length - 1, w, 0);
        const r = parsePrefixParts(t);
        if (len >= 0) {
          accepted++;
          expect(r).toEqual({ ok: true, value: { addr: fromWords(w[0]!, w[1]!, w[2]!, w[3]!), len } });
        } else if (!/\s/.test(t)) expect(r.ok).toBe(false);
      }),
      { seed: 4632, numRuns: 20000 },
    );
    expect(accepted).toBeGreaterThan(2000);
  });
});

describe("formatWords", () => {
  it("prints ip-address's correct form (cross-check: ip-address Address6.correctForm())", () => {
    // ip-address prints IPv4-mapped addresses in hex; RFC 5952 §5 wants the dotted tail, checked below
    let compared = 0;
    fc.assert(
      fc.property(addrArb, (a) => {
        if (a >> 32n === 0xffffn) return;
        compared++;
        const [w0, w1, w2, w3] = toWords(a);
        expect(formatWords(w0, w1, w2, w3)).toBe(new Address6(formatAddrExpanded(a)).correctForm());
      }),
      { seed: 5952, numRuns: 10000 },
    );
    expect(compared).toBeGreaterThan(8000);
  });

  it("prints ::ffff:0:0/96 with a dotted tail (RFC 5952 §5; cross-check: ip-address to4in6())", () => {
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: 0xffffffffn }), (v) => {
        const a = (0xffffn << 32n) | v;
        const [w0, w1, w2, w3] = toWords(a);
        expect(formatWords(w0, w1, w2, w3)).toBe(new Address6(formatAddrExpanded(a)).to4in6());
      }),
      { seed: 6052, numRuns: 2000 },
    );
  });
});
