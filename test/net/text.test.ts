/**
 * Tests for the text edge: RFC 5952 canonical output, RFC 4291 input forms, rejection reasons,
 * and cross-checks of the hand-written fast paths against ip-address.
 */
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { Address6 } from "ip-address";
import {
  explainBadAddress,
  formatAddr,
  formatAddrExpanded,
  formatWords,
  parseAddr,
  parseWordsInto,
} from "../../src/net/text.js";
import { ALL_ONES, type Addr, toWords } from "../../src/net/uint128.js";

function addr(s: string): Addr {
  const r = parseAddr(s);
  if (!r.ok) throw new Error(r.reason);
  return r.value;
}

const MAPPED_PREFIX = 0xffffn << 32n; // ::ffff:0:0/96
const isMapped = (a: Addr) => a >> 32n === 0xffffn;

/**
 * 128-bit values with many zero groups, so that zero runs of every length and position appear
 * (uniform random values almost never contain a zero group).
 */
const group = fc.oneof(
  { arbitrary: fc.constant(0), weight: 5 },
  { arbitrary: fc.integer({ min: 1, max: 0xf }), weight: 1 },
  { arbitrary: fc.integer({ min: 0, max: 0xffff }), weight: 4 },
);
const addrArb: fc.Arbitrary<Addr> = fc.oneof(
  { arbitrary: fc.array(group, { minLength: 8, maxLength: 8 }).map((g) => g.reduce((acc, v) => (acc << 16n) | BigInt(v), 0n)), weight: 8 },
  { arbitrary: fc.bigInt({ min: 0n, max: ALL_ONES }), weight: 1 },
  { arbitrary: fc.bigInt({ min: 0n, max: 0xffffffffn }).map((v) => MAPPED_PREFIX | v), weight: 1 },
);

describe("RFC 5952 canonical text", () => {
  // input, canonical output, source
  const vectors: [string, string, string][] = [
    ["2001:0db8::0001", "2001:db8::1", "RFC 5952 §4.1 (leading zeros dropped)"],
    ["2001:db8:0:0:0:0:2:1", "2001:db8::2:1", "RFC 5952 §4.2.1 (shorten as much as possible)"],
    ["2001:db8::0:1", "2001:db8::1", "RFC 5952 §4.2.1 (compress the whole run)"],
    ["2001:db8:0:1:1:1:1:1", "2001:db8:0:1:1:1:1:1", "RFC 5952 §4.2.2 (no :: for one 16-bit 0 field)"],
    ["2001:0:0:1:0:0:0:1", "2001:0:0:1::1", "RFC 5952 §4.2.3 (longest run)"],
    ["2001:db8:0:0:1:0:0:1", "2001:db8::1:0:0:1", "RFC 5952 §4.2.3 (first of equal runs)"],
    ["2001:0db8:0:0:1:0:0:1", "2001:db8::1:0:0:1", "RFC 5952 §1 list"],
    ["2001:db8::0:1:0:0:1", "2001:db8::1:0:0:1", "RFC 5952 §1 list"],
    ["2001:0db8::1:0:0:1", "2001:db8::1:0:0:1", "RFC 5952 §1 list"],
    ["2001:db8:0:0:1::1", "2001:db8::1:0:0:1", "RFC 5952 §1 list"],
    ["2001:db8:0000:0:1::1", "2001:db8::1:0:0:1", "RFC 5952 §1 list"],
    ["2001:DB8:0:0:1::1", "2001:db8::1:0:0:1", "RFC 5952 §1 list; §4.3 lowercase"],
    ["2001:DB8:0:0:8:800:200C:417A", "2001:db8::8:800:200c:417a", "RFC 4291 §2.2 example; RFC 5952 §4.3"],
    ["FF01:0:0:0:0:0:0:101", "ff01::101", "RFC 4291 §2.2 example; RFC 5952 §4.3"],
    ["0:0:0:0:0:0:0:1", "::1", "RFC 4291 §2.2 example (loopback)"],
    ["0:0:0:0:0:0:0:0", "::", "RFC 4291 §2.2 example (unspecified)"],
    ["1:0:0:0:0:0:0:0", "1::", "RFC 5952 §4.2.1 (trailing run)"],
    ["0:0:0:0:0:ffff:192.0.2.1", "::ffff:192.0.2.1", "RFC 5952 §5 (IPv4-mapped, dotted tail)"],
  ];
  it.each(vectors)("%s -> %s (%s)", (input, want) => {
    expect(formatAddr(addr(input))).toBe(want);
  });

  it("keeps the port outside brackets apart from the address (RFC 5952 §6)", () => {
    // RFC 5952 §6: "[2001:db8::1]:80"; the bare "2001:db8::1:80" is a different, valid address
    expect(`[${formatAddr(addr("2001:db8::1"))}]:80`).toBe("[2001:db8::1]:80");
    expect(parseAddr("[2001:db8::1]:80").ok).toBe(false);
    expect(formatAddr(addr("2001:db8::1:80"))).toBe("2001:db8::1:80");
    expect(addr("2001:db8::1:80")).not.toBe(addr("2001:db8::1"));
  });

  it("matches ip-address correctForm() outside ::ffff:0:0/96", () => {
    // cross-check: ip-address Address6.correctForm() (prints IPv4-mapped addresses in hex, so those are checked below)
    let compared = 0;
    fc.assert(
      fc.property(addrArb, (a) => {
        if (isMapped(a)) return;
        compared++;
        expect(formatAddr(a)).toBe(new Address6(formatAddrExpanded(a)).correctForm());
      }),
      { seed: 5952, numRuns: 5000 },
    );
    expect(compared).toBeGreaterThan(4000);
  });

  it("prints ::ffff:0:0/96 with a dotted tail", () => {
    // RFC 5952 §5; cross-check: ip-address Address6.to4in6() (mixed notation) and to4() (the IPv4 part)
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: 0xffffffffn }), (v) => {
        const a = MAPPED_PREFIX | v;
        const ref = new Address6(formatAddrExpanded(a));
        expect(formatAddr(a)).toBe(ref.to4in6());
        expect(formatAddr(a)).toBe(`::ffff:${ref.to4().correctForm()}`);
      }),
      { seed: 5, numRuns: 1000 },
    );
    // just outside the block the hex form is used (RFC 5952 §5: only for the well-known prefix)
    expect(formatAddr(addr("::fffe:c000:201"))).toBe("::fffe:c000:201");
    expect(formatAddr(addr("::1:ffff:c000:201"))).toBe("::1:ffff:c000:201");
    expect(formatAddr(addr("::ffff:0:0"))).toBe("::ffff:0.0.0.0");
  });

  it("formatWords agrees with formatAddr", () => {
    fc.assert(
      fc.property(addrArb, (a) => {
        const [w0, w1, w2, w3] = toWords(a);
        expect(formatWords(w0, w1, w2, w3)).toBe(formatAddr(a));
        // signed 32-bit inputs (as from an Int32Array) print the same
        expect(formatWords(w0 | 0, w1 | 0, w2 | 0, w3 | 0)).toBe(formatAddr(a));
      }),
      { seed: 7, numRuns: 2000 },
    );
  });
});

describe("round trip", () => {
  it("parse(format(x)) === x and parse(formatExpanded(x)) === x", () => {
    fc.assert(
      fc.property(addrArb, (a) => {
        expect(parseAddr(formatAddr(a))).toEqual({ ok: true, value: a });
        expect(parseAddr(formatAddrExpanded(a))).toEqual({ ok: true, value: a });
      }),
      { seed: 4291, numRuns: 5000 },
    );
  });

  it("formatAddrExpanded writes eight 4-digit groups", () => {
    // RFC 3596 §2.5 example address; cross-check: ip-address canonicalForm()
    expect(formatAddrExpanded(addr("4321:0:1:2:3:4:567:89ab"))).toBe("4321:0000:0001:0002:0003:0004:0567:89ab");
    expect(formatAddrExpanded(0n)).toBe("0000:0000:0000:0000:0000:0000:0000:0000");
    expect(formatAddrExpanded(ALL_ONES)).toBe("ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff");
    fc.assert(
      fc.property(addrArb, (a) => {
        expect(formatAddrExpanded(a)).toBe(new Address6(formatAddr(a)).canonicalForm());
      }),
      { seed: 3596, numRuns: 1000 },
    );
  });

  it("the expanded form gives the RFC 3596 §2.5 reverse name", () => {
    // RFC 3596 §2.5: nibbles in reverse order under ip6.arpa.
    const nibbles = formatAddrExpanded(addr("4321:0:1:2:3:4:567:89ab")).replace(/:/g, "").split("").reverse().join(".");
    expect(`${nibbles}.ip6.arpa.`).toBe("b.a.9.8.7.6.5.0.4.0.0.0.3.0.0.0.2.0.0.0.1.0.0.0.0.0.0.0.1.2.3.4.ip6.arpa.");
  });
});

/** Text forms of `a` that RFC 4291 §2.2 allows, built from the groups with random choices. */
function textForms(a: Addr, r: { upper: boolean; pads: number[]; run: number; dotted: boolean }): string {
  const g = Array.from({ length: 8 }, (_, i) => Number((a >> BigInt(112 - 16 * i)) & 0xffffn));
  const groups = r.dotted ? 6 : 8;
  const hex = g.slice(0, groups).map((v, i) => {
    const h = v.toString(16);
    const padded = h.padStart(Math.min(4, h.length + r.pads[i]!), "0"); // leading zeros are allowed (RFC 4291 §2.2 form 1)
    return r.upper ? padded.toUpperCase() : padded;
  });
  const tail = r.dotted ? [`${g[6]! >> 8}.${g[6]! & 255}.${g[7]! >> 8}.${g[7]! & 255}`] : [];
  // pick one run of zero groups among the hex groups (any run, not only the longest) to write as "::"
  const runs: [number, number][] = [];
  for (let i = 0; i < groups; ) {
    if (g[i] === 0) {
      let j = i;
      while (j < groups && g[j] === 0) j++;
      // a shorter part of the run is also legal: "::" stands for one or more zero groups
      runs.push([i, j]);
      if (j - i > 1) runs.push([i + 1, j], [i, j - 1]);
      i = j;
    } else i++;
  }
  if (runs.length === 0 || r.run < 0) return [...hex, ...tail].join(":");
  const [s, e] = runs[r.run % runs.length]!;
  const head = hex.slice(0, s).join(":");
  const rest = [...hex.slice(e), ...tail].join(":");
  return `${head}::${rest}`;
}

const formArb = fc.record({
  upper: fc.boolean(),
  pads: fc.array(fc.integer({ min: 0, max: 3 }), { minLength: 8, maxLength: 8 }),
  run: fc.integer({ min: -1, max: 5 }),
  dotted: fc.boolean(),
});

describe("parsing RFC 4291 text forms", () => {
  it("accepts every generated form that ip-address accepts, with the same value", () => {
    // cross-check: ip-address Address6 (isValid, bigInt())
    const kinds = new Set<string>();
    fc.assert(
      fc.property(addrArb, formArb, (a, r) => {
        const s = textForms(a, r);
        expect(Address6.isValid(s), s).toBe(true); // generator sanity: every form is legal
        expect(new Address6(s).bigInt(), s).toBe(a);
        expect(parseAddr(s), s).toEqual({ ok: true, value: a });
        const out = new Uint32Array(4);
        expect(parseWordsInto(s, out, 0), s).toBe(true);
        expect([...out]).toEqual(toWords(a));
        if (s.includes("::")) kinds.add("::");
        if (s.includes(".")) kinds.add("dotted");
        if (/[A-F]/.test(s)) kinds.add("upper");
        if (/(^|:)0[0-9a-fA-F]/.test(s)) kinds.add("leading zero");
      }),
      { seed: 2373, numRuns: 5000 },
    );
    expect(kinds).toEqual(new Set(["::", "dotted", "upper", "leading zero"]));
  });

  it("accepts the forms of RFC 4291 §2.2", () => {
    // RFC 4291 §2.2 examples: full, compressed, mixed with a dotted quad (the first, third and
    // fourth addresses are recalled from RFC 4291 §2.2 from memory; the values follow from the text)
    expect(addr("ABCD:EF01:2345:6789:ABCD:EF01:2345:6789")).toBe(0xabcdef0123456789abcdef0123456789n);
    expect(addr("2001:DB8:0:0:8:800:200C:417A")).toBe(addr("2001:DB8::8:800:200C:417A"));
    expect(addr("0:0:0:0:0:0:13.1.68.3")).toBe(addr("::13.1.68.3"));
    expect(addr("0:0:0:0:0:FFFF:129.144.52.38")).toBe(addr("::FFFF:129.144.52.38"));
    expect(addr("::FFFF:129.144.52.38")).toBe(0xffff81903426n);
    // "::" standing for a single group is legal input (RFC 5952 §4.2.2 only governs output)
    expect(addr("1::3:4:5:6:7:8")).toBe(addr("1:0:3:4:5:6:7:8"));
    expect(addr("1:2:3:4:5::1.2.3.4")).toBe(addr("1:2:3:4:5:0:0:0") | 0x01020304n);
    // surrounding white space is trimmed by parseAddr (not by parseWordsInto)
    expect(addr(" ::1 ")).toBe(1n);
  });

  it("writes at the given offset and nowhere else", () => {
    const out = new Uint32Array(12).fill(0xdeadbeef);
    expect(parseWordsInto("2001:db8::ffff:1", out, 4)).toBe(true);
    expect([...out.slice(0, 4)]).toEqual([0xdeadbeef, 0xdeadbeef, 0xdeadbeef, 0xdeadbeef]);
    expect([...out.slice(4, 8)]).toEqual([0x20010db8, 0, 0, 0xffff0001]);
    expect([...out.slice(8)]).toEqual([0xdeadbeef, 0xdeadbeef, 0xdeadbeef, 0xdeadbeef]);
    // a failed parse leaves the slot as it was
    expect(parseWordsInto("1::2::3", out, 0)).toBe(false);
    expect(out[0]).toBe(0xdeadbeef);
  });

  // input, keyword the reason must contain, whether ip-address accepts it, note.
  // ip-address accepts zone ids (dropping them) and a trailing /len; we do not: an address field
  // takes one bare address.
  const rejects: [string, RegExp, boolean, string][] = [
    ["fe80::1%eth0", /zone id/, true, "zone id (ip-address accepts it and drops the zone)"],
    ["fe80::1%25eth0", /zone id/, true, "URL-escaped zone id (RFC 6874)"],
    ["1.2.3.4", /IPv4/, false, "IPv4 address alone"],
    ["2001:db8::/32", /prefix/, true, "a prefix where an address is due (ip-address accepts it)"],
    ["[::1]", /bracket/, false, "brackets belong to URLs (RFC 5952 §6)"],
    ["", /empty/, false, "empty string"],
    ["   ", /empty/, false, "white space only"],
    [":::", /not an IPv6 address/, false, "three colons"],
    ["1::2::3", /not an IPv6 address/, false, "two '::' (RFC 4291 §2.2: '::' may appear only once)"],
    ["1:2:3:4:5:6:7:8:9", /not an IPv6 address/, false, "nine groups"],
    ["1:2:3:4:5:6:7", /not an IPv6 address/, false, "seven groups, no '::'"],
    ["::1:2:3:4:5:6:7:8", /not an IPv6 address/, false, "'::' plus eight groups"],
    ["12345::", /not an IPv6 address/, false, "5-digit group"],
    ["1:2:3:4:5:6:7:", /not an IPv6 address/, false, "trailing ':'"],
    [":1:2:3:4:5:6:7:8", /not an IPv6 address/, false, "leading single ':'"],
    [":1::", /not an IPv6 address/, false, "leading single ':' before '::'"],
    ["::ffff:1.2.3.04", /not an IPv6 address/, false, "leading zero in the dotted quad"],
    ["::ffff:1.2.3.256", /not an IPv6 address/, false, "dotted-quad part above 255"],
    ["::ffff:1.2.3", /not an IPv6 address/, false, "three-part dotted tail"],
    ["::1.2.3.4:5", /not an IPv6 address/, false, "dotted quad not last"],
    ["1:2:3:4:5:6:7:1.2.3.4", /not an IPv6 address/, false, "dotted tail after seven groups"],
    ["1:2:3:4:5:6::1.2.3.4", /not an IPv6 address/, false, "'::' with nothing left to stand for"],
    ["::g", /not an IPv6 address/, false, "not hex"],
    ["1:2:3:4:5:6:7:8::", /not an IPv6 address/, false, "'::' after eight groups"],
  ];
  it.each(rejects)("rejects %j", (input, keyword, refAccepts) => {
    expect(Address6.isValid(input)).toBe(refAccepts); // cross-check: ip-address Address6.isValid()
    const r = parseAddr(input);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.reason).toMatch(keyword);
      expect(r.reason).toBe(explainBadAddress(input));
    }
    expect(parseWordsInto(input, new Uint32Array(4), 0)).toBe(false);
  });

  it("accepts and rejects exactly what ip-address does on random colon/hex/dot strings", () => {
    // cross-check: ip-address Address6.isValid() and bigInt(); the alphabet has no '%' or '/',
    // the two things ip-address accepts and we reject on purpose
    const hex = "0123456789abcdefABCDEF";
    const piece = fc.oneof(
      fc.constant(""),
      fc.string({ unit: fc.constantFrom(...hex), minLength: 1, maxLength: 5 }),
      fc.constantFrom("0", "00000", "1.2.3.4", "01.2.3.4", "255.255.255.255", "256.1.1.1", "1.2.3", "1..2.3"),
    );
    let valid = 0;
    let invalid = 0;
    fc.assert(
      fc.property(fc.array(piece, { minLength: 1, maxLength: 10 }).map((a) => a.join(":")), (s) => {
        const ref = Address6.isValid(s) ? new Address6(s).bigInt() : null;
        const r = parseAddr(s);
        expect(r.ok ? r.value : null, s).toBe(ref);
        if (ref === null) invalid++;
        else valid++;
      }),
      { seed: 6874, numRuns: 30000 },
    );
    expect(valid).toBeGreaterThan(500);
    expect(invalid).toBeGreaterThan(1000);
  });

  it("quotes the input in the reason and says what is allowed", () => {
    const r = parseAddr("2001:db8::zz");
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.reason).toContain('"2001:db8::zz"');
      expect(r.reason).toMatch(/2001:db8::1/);
    }
  });
});
