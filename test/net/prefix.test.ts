/**
 * Tests for Prefix and the prefix-list operations: table tests, RFC 4291 §2.3 text vectors, a slow
 * bit-string reference for the relations, and a cross-check against Python 3's ipaddress.
 */
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  Prefix,
  collapse,
  comparePrefixes,
  coveringPrefix,
  exclude,
  parsePrefix,
  smallestCommonPrefix,
  summarizeRange,
} from "../../src/net/prefix.js";
import { parseAddr } from "../../src/net/text.js";
import { ALL_ONES, type Addr } from "../../src/net/uint128.js";
import { runPython } from "../helpers/python.js";

function addr(s: string): Addr {
  const r = parseAddr(s);
  if (!r.ok) throw new Error(r.reason);
  return r.value;
}
function pfx(s: string): Prefix {
  const r = parsePrefix(s);
  if (!r.ok) throw new Error(r.reason);
  return r.value;
}
const fmt = (ps: readonly Prefix[]) => ps.map((p) => p.format());

/** Slow, obviously correct reference: a prefix is the string of its first `len` bits. */
const bits = (a: Addr, n: number) => a.toString(2).padStart(128, "0").slice(0, n);
const ref = {
  contains: (p: Prefix, a: Addr) => bits(a, p.len) === bits(p.addr, p.len),
  overlaps: (p: Prefix, q: Prefix) => bits(p.addr, p.len).startsWith(bits(q.addr, q.len)) || bits(q.addr, q.len).startsWith(bits(p.addr, p.len)),
  isSubnetOf: (p: Prefix, q: Prefix) => bits(p.addr, p.len).startsWith(bits(q.addr, q.len)),
  equals: (p: Prefix, q: Prefix) => bits(p.addr, p.len) === bits(q.addr, q.len),
  common: (ps: Prefix[]) => {
    const ss = ps.map((p) => bits(p.addr, p.len));
    let n = 0;
    while (ss.every((s) => n < s.length && s[n] === ss[0]![n])) n++;
    return n;
  },
};

/** Pairs of prefixes that are often related (nested, equal, siblings) and sometimes unrelated. */
const pairArb = fc
  .tuple(fc.bigInt({ min: 0n, max: ALL_ONES }), fc.integer({ min: 0, max: 128 }), fc.integer({ min: 0, max: 128 }), fc.integer({ min: -1, max: 127 }), fc.bigInt({ min: 0n, max: ALL_ONES }))
  .map(([a, l1, l2, flip, noise]) => {
    // b shares a's bits up to `flip`, differs at bit `flip` (or equals a when flip = -1), and is random after
    let b = a;
    if (flip >= 0) {
      const keep = ((1n << BigInt(128 - flip)) - 1n) ^ ALL_ONES; // bits 0..flip-1
      b = (a & keep) | (~a & (1n << BigInt(127 - flip))) | (noise & ((1n << BigInt(127 - flip)) - 1n));
    }
    return [new Prefix(a, l1), new Prefix(b, l2)] as const;
  });

describe("parsePrefix: RFC 4291 §2.3 text vectors", () => {
  // RFC 4291 §2.3: the three legal ways of writing the /60 (reference §11.8)
  it.each(["2001:0DB8:0000:CD30:0000:0000:0000:0000/60", "2001:0DB8::CD30:0:0:0:0/60", "2001:0DB8:0:CD30::/60"])("%s is 2001:db8:0:cd30::/60", (t) => {
    const p = pfx(t);
    expect(p.hasHostBits).toBe(false);
    expect(p.format()).toBe("2001:db8:0:cd30::/60"); // RFC 5952 §7: prefix text follows the address rules
  });

  it("rejects 2001:0DB8:0:CD3/60 (not an address: four groups, no '::')", () => {
    // RFC 4291 §2.3 lists it as not legal
    const r = parsePrefix("2001:0DB8:0:CD3/60");
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/not an IPv6 address/);
  });

  it.each([
    // RFC 4291 §2.3: these expand to 2001:db8::cd30 and 2001:db8::cd3, not the intended prefix
    ["2001:0DB8::CD30/60", "2001:db8::cd30/60"],
    ["2001:0DB8::CD3/60", "2001:db8::cd3/60"],
  ])("parses %s but keeps and reports the host bits", (t, written) => {
    const p = pfx(t);
    expect(p.hasHostBits).toBe(true);
    expect(p.format()).toBe(written);
    expect(p.masked().format()).toBe("2001:db8::/60");
    expect(p.masked().hasHostBits).toBe(false);
    expect(p.equals(pfx("2001:db8:0:cd30::/60"))).toBe(false);
    expect(p.equals(pfx("2001:db8::/60"))).toBe(true); // equals ignores host bits
  });

  // input, keyword the reason must contain
  it.each([
    ["2001:db8::", /no prefix length/], // an address where a prefix is due
    ["::/129", /0 to 128/],
    ["::/-1", /0 to 128/],
    ["::/", /0 to 128/],
    ["::/6 4", /0 to 128/],
    ["::/1.5", /0 to 128/],
    ["::/64/1", /0 to 128/],
    ["::/0x40", /0 to 128/],
    ["fe80::1%eth0/64", /zone id/],
    ["192.0.2.0/24", /IPv4/],
    ["2001:db8::zz/32", /not an IPv6 address/],
  ])("rejects %j", (t, keyword) => {
    const r = parsePrefix(t);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(keyword);
  });

  it("accepts the extremes", () => {
    expect(pfx("::/0").size).toBe(1n << 128n);
    expect(pfx("::1/128").size).toBe(1n);
    expect(pfx("ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff/128").last).toBe(ALL_ONES);
  });
});

describe("Prefix values", () => {
  it("rejects out-of-range construction (programmer error)", () => {
    expect(() => new Prefix(0n, 129)).toThrow(RangeError);
    expect(() => new Prefix(0n, -1)).toThrow(RangeError);
    expect(() => new Prefix(0n, 1.5)).toThrow(RangeError);
    expect(() => new Prefix(-1n, 64)).toThrow(RangeError);
    expect(() => new Prefix(ALL_ONES + 1n, 64)).toThrow(RangeError);
  });

  // prefix, first, last, size
  it.each([
    ["2001:db8::/32", "2001:db8::", "2001:db8:ffff:ffff:ffff:ffff:ffff:ffff", 1n << 96n], // documentation block (RFC 3849)
    ["2001:db8::1/64", "2001:db8::", "2001:db8::ffff:ffff:ffff:ffff", 1n << 64n], // host bits do not move first/last
    ["::/0", "::", "ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff", 1n << 128n], // everything
    ["::1/128", "::1", "::1", 1n], // one address
    ["5f00::/16", "5f00::", "5f00:ffff:ffff:ffff:ffff:ffff:ffff:ffff", 1n << 112n], // SRv6 SID block (RFC 9602)
    ["fe80::/10", "fe80::", "febf:ffff:ffff:ffff:ffff:ffff:ffff:ffff", 1n << 118n], // link-local (RFC 4291 §2.5.6)
    ["2001:db8::8/125", "2001:db8::8", "2001:db8::f", 8n], // a /125 is 8 addresses
  ])("%s spans %s .. %s", (t, first, last, size) => {
    const p = pfx(t);
    expect(p.first).toBe(addr(first));
    expect(p.last).toBe(addr(last));
    expect(p.size).toBe(size);
    expect(p.last - p.first + 1n).toBe(p.size);
  });

  it("masked() returns itself when already clean", () => {
    const p = pfx("2001:db8::/32");
    expect(p.masked()).toBe(p);
    expect(pfx("2001:db8::1/32").masked()).not.toBe(p);
  });

  // a, b, a overlaps b, a subnet of b, b subnet of a
  it.each([
    ["2001:db8::/32", "2001:db8:1::/48", true, false, true], // nested
    ["2001:db8::/32", "2001:db8::/32", true, true, true], // equal: each is a subnet of the other
    ["2001:db8::/33", "2001:db8:8000::/33", false, false, false], // siblings
    ["2001:db8::/32", "2001:db9::/32", false, false, false], // neighbours
    ["::/0", "5f00::/16", true, false, true], // ::/0 holds everything
    ["2001:db8::1/128", "2001:db8::/127", true, true, false], // address inside a /127
    ["2001:db8::2/128", "2001:db8::/127", false, false, false], // just outside it
    ["2001:db8::1/64", "2001:db8::/64", true, true, true], // host bits are ignored
  ])("%s vs %s", (x, y, ov, sub, sup) => {
    const a = pfx(x);
    const b = pfx(y);
    expect(a.overlaps(b)).toBe(ov);
    expect(b.overlaps(a)).toBe(ov); // symmetric
    expect(a.isSubnetOf(b)).toBe(sub);
    expect(b.isSupernetOf(a)).toBe(sub);
    expect(b.isSubnetOf(a)).toBe(sup);
    expect(a.isSupernetOf(b)).toBe(sup);
  });

  // prefix, address, contained
  it.each([
    ["2001:db8::/32", "2001:db8::", true], // first
    ["2001:db8::/32", "2001:db8:ffff:ffff:ffff:ffff:ffff:ffff", true], // last
    ["2001:db8::/32", "2001:db7:ffff:ffff:ffff:ffff:ffff:ffff", false], // one before
    ["2001:db8::/32", "2001:db9::", false], // one after
    ["2001:db8::5/126", "2001:db8::7", true], // host bits of the prefix ignored
    ["::/0", "ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff", true],
  ])("%s contains %s: %s", (t, a, want) => {
    expect(pfx(t).contains(addr(a))).toBe(want);
  });

  it("relations match the bit-string reference", () => {
    const seen = { overlap: 0, disjoint: 0, sub: 0, notSub: 0, contains: 0, notContains: 0 };
    fc.assert(
      fc.property(pairArb, ([p, q]) => {
        const ov = ref.overlaps(p, q);
        expect(p.overlaps(q)).toBe(ov);
        expect(q.overlaps(p)).toBe(ov);
        expect(p.isSubnetOf(q)).toBe(ref.isSubnetOf(p, q));
        expect(q.isSupernetOf(p)).toBe(ref.isSubnetOf(p, q));
        expect(p.equals(q)).toBe(p.len === q.len && ref.equals(p, q));
        expect(p.contains(q.addr)).toBe(ref.contains(p, q.addr));
        seen[ov ? "overlap" : "disjoint"]++;
        seen[ref.isSubnetOf(p, q) ? "sub" : "notSub"]++;
        seen[ref.contains(p, q.addr) ? "contains" : "notContains"]++;
      }),
      { seed: 128, numRuns: 5000 },
    );
    for (const [k, v] of Object.entries(seen)) expect(v, k).toBeGreaterThan(500);
  });

  it("smallestCommonPrefix and coveringPrefix match the bit-string reference", () => {
    fc.assert(
      fc.property(pairArb, ([p, q]) => {
        const c = smallestCommonPrefix(p, q);
        expect(c.len).toBe(ref.common([p, q]));
        expect(c.hasHostBits).toBe(false);
        expect(p.isSubnetOf(c) && q.isSubnetOf(c)).toBe(true);
        expect(coveringPrefix([p, q, p])!.equals(c)).toBe(true);
      }),
      { seed: 64, numRuns: 3000 },
    );
    expect(coveringPrefix([])).toBeUndefined();
    expect(coveringPrefix([pfx("2001:db8::1/64")])!.format()).toBe("2001:db8::/64");
  });

  it("comparePrefixes orders by first address, then shorter first", () => {
    const ps = ["2001:db8:1::/48", "2001:db8::/32", "2001:db8::/48", "::/0", "2001:db8::1/32"].map(pfx);
    expect(fmt([...ps].sort(comparePrefixes))).toEqual(["::/0", "2001:db8::/32", "2001:db8::1/32", "2001:db8::/48", "2001:db8:1::/48"]);
  });
});

describe("supernet / subnetAt / at", () => {
  it.each([
    ["2001:db8:1::/48", undefined, "2001:db8::/47"], // default: one bit shorter
    ["2001:db8:1::/48", 32, "2001:db8::/32"],
    ["2001:db8:1::/48", 48, "2001:db8:1::/48"], // same length
    ["2001:db8:1::1/48", 48, "2001:db8:1::/48"], // host bits cleared
    ["2001:db8::/32", 0, "::/0"],
  ])("%s supernet(%s) is %s", (t, to, want) => {
    expect(pfx(t).supernet(to).format()).toBe(want);
  });

  it("refuses to widen past /0 or to a longer length", () => {
    // unlike Python's supernet(), which returns ::/0 itself for ::/0
    expect(() => pfx("::/0").supernet()).toThrow(RangeError);
    expect(() => pfx("2001:db8::/32").supernet(33)).toThrow(RangeError);
  });

  it("RFC 8986 §3.2: Router 3's locator in block 2001:db8:bbbb::/48", () => {
    // RFC 8986 §3.2 example: block 2001:db8:bbbb::/48, locator 2001:db8:bbbb:3::/64 for Router 3
    expect(pfx("2001:db8:bbbb::/48").subnetAt(64, 3n).format()).toBe("2001:db8:bbbb:3::/64");
  });

  it("a /48 carved into /64 locators gives 65536 of them", () => {
    // derived from RFC 8986 §3.2 (one /48 per domain, one /64 per node): 2^(64-48)
    const block = pfx("2001:db8:bbbb::/48");
    expect(block.size / pfx("2001:db8:bbbb::/64").size).toBe(65536n);
    expect(block.subnetAt(64, 0n).format()).toBe("2001:db8:bbbb::/64");
    expect(block.subnetAt(64, 65535n).format()).toBe("2001:db8:bbbb:ffff::/64");
    expect(() => block.subnetAt(64, 65536n)).toThrow(RangeError);
    expect(() => block.subnetAt(64, -1n)).toThrow(RangeError);
    expect(() => block.subnetAt(47, 0n)).toThrow(RangeError);
    expect(() => block.subnetAt(129, 0n)).toThrow(RangeError);
    // RFC 8986 §3.2: a /48 out of a /32 is 1/2^16 of it
    expect(pfx("2001:db8::/32").size / block.size).toBe(65536n);
  });

  it("at(n) walks the prefix from its first address", () => {
    const p = pfx("2001:db8::1/126"); // host bits: at() counts from the masked first address
    expect(p.at(0n)).toBe(addr("2001:db8::"));
    expect(p.at(3n)).toBe(addr("2001:db8::3"));
    expect(() => p.at(4n)).toThrow(RangeError);
    expect(() => p.at(-1n)).toThrow(RangeError);
    expect(pfx("::/0").at(ALL_ONES)).toBe(ALL_ONES);
  });
});

describe("collapse / summarizeRange / exclude: tables", () => {
  it.each([
    [["2001:db8::/33", "2001:db8:8000::/33"], ["2001:db8::/32"]], // siblings merge
    [["2001:db8::/32", "2001:db8:1::/48"], ["2001:db8::/32"]], // nested one disappears
    [["2001:db8::/48", "2001:db8:2::/48"], ["2001:db8::/48", "2001:db8:2::/48"]], // a gap stays
    [["2001:db8:1::/48", "2001:db8:2::/48"], ["2001:db8:1::/48", "2001:db8:2::/48"]], // adjacent but not aligned
    [["::1/128", "::/128", "::2/127"], ["::/126"]], // three pieces make a /126
    [["2001:db8::1/64", "2001:db8:0:1::/64"], ["2001:db8::/63"]], // host bits ignored
    [[], []], // empty
  ])("collapse(%j) = %j", (ins, outs) => {
    expect(fmt(collapse(ins.map(pfx)))).toEqual(outs);
  });

  it.each([
    ["2001:db8::", "2001:db8::", ["2001:db8::/128"]],
    ["2001:db8::", "2001:db8::ff", ["2001:db8::/120"]],
    ["2001:db8::1", "2001:db8::6", ["2001:db8::1/128", "2001:db8::2/127", "2001:db8::4/127", "2001:db8::6/128"]],
    ["::", "ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff", ["::/0"]], // whole space: must stop at 2^128
    ["ffff:ffff:ffff:ffff:ffff:ffff:ffff:fffe", "ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff", ["ffff:ffff:ffff:ffff:ffff:ffff:ffff:fffe/127"]],
  ])("summarizeRange(%s, %s)", (a, b, want) => {
    expect(fmt(summarizeRange(addr(a), addr(b)))).toEqual(want);
  });

  it("summarizeRange rejects first > last", () => {
    expect(() => summarizeRange(2n, 1n)).toThrow(RangeError);
  });

  it.each([
    ["2001:db8::/32", "2001:db8::/34", ["2001:db8:4000::/34", "2001:db8:8000::/33"]],
    ["2001:db8::/32", "2001:db8::/32", []], // nothing left
    ["2001:db8::/32", "2001:db9::/32", ["2001:db8::/32"]], // disjoint: outer unchanged
    ["2001:db8::/48", "2001:db8::/32", []], // outer inside inner
    ["2001:db8::/126", "2001:db8::2/128", ["2001:db8::/127", "2001:db8::3/128"]],
  ])("exclude(%s, %s)", (o, i, want) => {
    expect(fmt(exclude(pfx(o), pfx(i)))).toEqual(want);
  });
});

describe("cross-check: Python 3 ipaddress", () => {
  type Net = [string, number];
  const net = (p: Prefix): Net => [String(p.addr), p.len];
  const nets = (ps: readonly Prefix[]): Net[] => ps.map((p) => [String(p.first), p.len]);
  const sortNets = (ns: Net[]) => [...ns].sort((a, b) => (BigInt(a[0]) < BigInt(b[0]) ? -1 : BigInt(a[0]) > BigInt(b[0]) ? 1 : a[1] - b[1]));

  const anyAddr = fc.bigInt({ min: 0n, max: ALL_ONES });
  /** A random prefix, host bits left in about half the time. */
  const prefixIn = (minLen: number, maxLen: number) =>
    fc.tuple(anyAddr, fc.integer({ min: minLen, max: maxLen }), fc.boolean()).map(([a, l, dirty]) => {
      const p = new Prefix(a, l);
      return dirty ? p : p.masked();
    });

  // collapse: clusters of prefixes inside one random /104, so that merging happens
  const collapseCases = fc.sample(
    fc.tuple(anyAddr, fc.array(fc.tuple(fc.bigInt({ min: 0n, max: (1n << 24n) - 1n }), fc.integer({ min: 104, max: 128 })), { minLength: 1, maxLength: 14 })).map(([base, parts]) => {
      const b = base & ~((1n << 24n) - 1n);
      return parts.map(([off, len]) => new Prefix(b | off, len));
    }),
    { seed: 1001, numRuns: 200 },
  );
  // summarize: ranges of every magnitude, plus the edges of the space
  const summarizeCases: [Addr, Addr][] = [
    ...fc.sample(
      fc.tuple(anyAddr, fc.integer({ min: 0, max: 128 }), anyAddr).map(([a, k, r]): [Addr, Addr] => {
        const span = r & ((1n << BigInt(k)) - 1n);
        return [a, a + span > ALL_ONES ? ALL_ONES : a + span];
      }),
      { seed: 1002, numRuns: 200 },
    ),
    [0n, ALL_ONES],
    [0n, 0n],
    [ALL_ONES, ALL_ONES],
    [1n, ALL_ONES - 1n],
    [ALL_ONES - 1000n, ALL_ONES],
  ];
  // exclude: inner is a random subnet of outer (Python requires that); both may carry host bits
  const excludeCases = fc.sample(
    fc.tuple(prefixIn(0, 128), fc.integer({ min: 0, max: 128 }), anyAddr, fc.boolean()).map(([outer, extra, r, dirty]) => {
      const len = Math.min(128, outer.len + (extra % 40));
      const inner = new Prefix(outer.first | (r & ((1n << BigInt(128 - outer.len)) - 1n)), len);
      return [outer, dirty ? inner : inner.masked()] as const;
    }),
    { seed: 1003, numRuns: 200 },
  );
  // supernet: any length down to any shorter (or equal) length
  const supernetCases = fc.sample(
    fc.tuple(prefixIn(1, 128), fc.integer({ min: 0, max: 128 })).map(([p, t]) => [p, t % (p.len + 1)] as const),
    { seed: 1004, numRuns: 150 },
  );
  // subnets: up to 2^6 pieces, listed in full
  const subnetCases = fc.sample(
    fc.tuple(prefixIn(0, 128), fc.integer({ min: 0, max: 6 })).map(([p, k]) => [p, Math.min(128, p.len + k)] as const),
    { seed: 1005, numRuns: 150 },
  );

  // cross-check: Python 3 ipaddress (collapse_addresses, summarize_address_range, address_exclude,
  // supernet, subnets) — one python3 process for every case
  const py = runPython<{ collapse: Net[][]; summarize: Net[][]; exclude: Net[][]; supernet: Net[]; subnets: Net[][]; sorted: Net[] }>(
    `
import ipaddress
def N(c): return ipaddress.IPv6Network((int(c[0]), c[1]), strict=False)
def out(n): return [str(int(n.network_address)), n.prefixlen]
res = {
  "collapse": [[out(n) for n in ipaddress.collapse_addresses([N(c) for c in case])] for case in INPUT["collapse"]],
  "summarize": [[out(n) for n in ipaddress.summarize_address_range(ipaddress.IPv6Address(int(a)), ipaddress.IPv6Address(int(b)))] for a, b in INPUT["summarize"]],
  "exclude": [[out(n) for n in N(o).address_exclude(N(i))] for o, i in INPUT["exclude"]],
  "supernet": [out(N(p).supernet(new_prefix=t)) for p, t in INPUT["supernet"]],
  "subnets": [[out(n) for n in N(p).subnets(new_prefix=t)] for p, t in INPUT["subnets"]],
  "sorted": [out(n) for n in sorted(N(c) for case in INPUT["collapse"] for c in case)],
}
print(json.dumps(res))
`,
    {
      collapse: collapseCases.map((c) => c.map(net)),
      summarize: summarizeCases.map(([a, b]) => [String(a), String(b)]),
      exclude: excludeCases.map(([o, i]) => [net(o), net(i)]),
      supernet: supernetCases.map(([p, t]) => [net(p), t]),
      subnets: subnetCases.map(([p, t]) => [net(p), t]),
    },
  );

  it("collapse matches collapse_addresses (strict=False: host bits ignored)", () => {
    collapseCases.forEach((c, i) => expect(nets(collapse(c)), fmt(c).join(" ")).toEqual(py.collapse[i]));
    // the cases do merge things
    expect(collapseCases.filter((c, i) => py.collapse[i]!.length < c.length).length).toBeGreaterThan(50);
  });

  it("summarizeRange matches summarize_address_range", () => {
    summarizeCases.forEach(([a, b], i) => expect(nets(summarizeRange(a, b)), `${a}..${b}`).toEqual(py.summarize[i]));
  });

  it("exclude matches address_exclude (sorted)", () => {
    excludeCases.forEach(([o, inner], i) => expect(nets(exclude(o, inner)), `${o} - ${inner}`).toEqual(sortNets(py.exclude[i]!)));
  });

  it("supernet matches supernet(new_prefix=)", () => {
    supernetCases.forEach(([p, t], i) => expect(net(p.supernet(t)), `${p} to /${t}`).toEqual(py.supernet[i]));
  });

  it("subnetAt matches subnets(new_prefix=), index by index", () => {
    subnetCases.forEach(([p, t], i) => {
      const n = 1n << BigInt(t - p.len);
      const ours: Net[] = [];
      for (let k = 0n; k < n; k++) ours.push(net(p.subnetAt(t, k)));
      expect(ours, `${p} into /${t}`).toEqual(py.subnets[i]);
    });
  });

  it("comparePrefixes sorts like Python's network ordering", () => {
    const all = collapseCases.flat().map((p) => p.masked());
    expect(nets([...all].sort(comparePrefixes))).toEqual(py.sorted);
  });
});
