/**
 * formatWordsInto (the byte writer behind formatWords and the CSV emitter) against formatWords,
 * formatAddr and an outside library: ipaddr.js (IPv6#toRFC5952String, and for IPv4-mapped
 * addresses "::ffff:" + its dotted IPv4 form), on edge addresses and random ones.
 */
import fc from "fast-check";
import ipaddr from "ipaddr.js";
import { describe, expect, it } from "vitest";
import { formatAddr, formatAddrExpanded, formatWords, formatWordsInto } from "../../src/net/text.js";
import { ALL_ONES, type Addr, fromWords, toWords } from "../../src/net/uint128.js";

/** RFC 5952 text of `a` by ipaddr.js, with the dotted tail RFC 5952 §5 asks for on ::ffff:0:0/96. */
function outside(a: Addr): string {
  const ip = ipaddr.IPv6.parse(formatAddrExpanded(a));
  return ip.isIPv4MappedAddress() ? `::ffff:${ip.toIPv4Address().toString()}` : ip.toRFC5952String();
}

/** formatWordsInto's text, written at `at` in a buffer full of 0xee; checks it writes nothing else. */
function into(a: Addr, at: number): string {
  const buf = new Uint8Array(at + 64).fill(0xee);
  const [w0, w1, w2, w3] = toWords(a);
  const end = formatWordsInto(buf, at, w0, w1, w2, w3);
  expect(end - at).toBeLessThanOrEqual(39);
  expect(buf.subarray(0, at).every((b) => b === 0xee)).toBe(true);
  expect(buf.subarray(end).every((b) => b === 0xee)).toBe(true);
  const bytes = buf.subarray(at, end);
  expect(bytes.every((b) => b < 0x80)).toBe(true);
  // signed 32-bit words (as from an Int32Array) give the same bytes
  const again = new Uint8Array(64);
  const end2 = formatWordsInto(again, 0, w0 | 0, w1 | 0, w2 | 0, w3 | 0);
  expect(Buffer.from(again.subarray(0, end2)).equals(Buffer.from(bytes))).toBe(true);
  return Buffer.from(bytes).toString("latin1");
}

function check(a: Addr, at = 0): void {
  const t = into(a, at);
  const [w0, w1, w2, w3] = toWords(a);
  expect(t).toBe(outside(a));
  expect(formatWords(w0, w1, w2, w3)).toBe(t);
  expect(formatAddr(a)).toBe(t);
}

/** An address from eight 16-bit groups. */
const fromGroups = (g: readonly number[]): Addr => g.reduce((acc, v) => (acc << 16n) | BigInt(v), 0n);

describe("formatWordsInto", () => {
  it("writes the canonical text of edge addresses", () => {
    const cases: [Addr, string][] = [
      [0n, "::"],
      [ALL_ONES, "ffff:ffff:ffff:ffff:ffff:ffff:ffff:ffff"],
      [1n, "::1"],
      [fromGroups([1, 0, 0, 0, 0, 0, 0, 0]), "1::"],
      [fromGroups([0x2001, 0xdb8, 0, 0, 1, 0, 0, 1]), "2001:db8::1:0:0:1"], // tie: the first run
      [fromGroups([0x2001, 0xdb8, 0, 1, 0, 0, 0, 1]), "2001:db8:0:1::1"], // the longer run, not the first
      [fromGroups([0x2001, 0xdb8, 0, 1, 2, 3, 4, 5]), "2001:db8:0:1:2:3:4:5"], // one zero group stays
      [fromGroups([0, 1, 2, 3, 4, 5, 6, 0]), "0:1:2:3:4:5:6:0"],
      [fromGroups([0x5f00, 0, 0, 0, 0, 0, 0, 0xabcd]), "5f00::abcd"],
      [fromGroups([0x3fff, 0xf, 0xf0, 0xf00, 0xf000, 0, 0, 0]), "3fff:f:f0:f00:f000::"],
      [0xffffn << 32n, "::ffff:0.0.0.0"],
      [(0xffffn << 32n) | 0xc0000201n, "::ffff:192.0.2.1"],
      [(0xffffn << 32n) | 0xffffffffn, "::ffff:255.255.255.255"],
      [(0xffffn << 32n) | 0x0a09630an, "::ffff:10.9.99.10"],
      [(0xfffen << 32n) | 0xc0000201n, "::fffe:c000:201"], // just outside ::ffff:0:0/96: hex
      [(0x1ffffn << 32n) | 0xc0000201n, "::1:ffff:c000:201"],
      [0xc0000201n, "::c000:201"], // the old IPv4-compatible form is printed in hex
    ];
    for (const [a, text] of cases) {
      expect(into(a, 3)).toBe(text);
      check(a, 5);
    }
  });

  it("handles a zero run of every length at every position (all 256 zero patterns)", () => {
    for (let mask = 0; mask < 256; mask++) {
      for (const fill of [1, 0xa, 0xbc, 0xdef, 0x5f00, 0xffff]) {
        const g = Array.from({ length: 8 }, (_, i) => ((mask >> i) & 1 ? 0 : (fill + i * 0x111) & 0xffff || 1));
        check(fromGroups(g), mask % 7);
      }
    }
  });

  it("agrees with ipaddr.js and formatWords on random addresses", () => {
    const group = fc.oneof(fc.constant(0), fc.constant(0xffff), fc.integer({ min: 0, max: 0xffff }), fc.integer({ min: 1, max: 0xf }));
    const addr = fc.oneof(
      fc.bigInt({ min: 0n, max: ALL_ONES }),
      fc.array(group, { minLength: 8, maxLength: 8 }).map(fromGroups),
      fc.bigInt({ min: 0n, max: 0xffffffffn }).map((v) => (0xffffn << 32n) | v),
      fc.tuple(fc.integer({ min: 0, max: 0xffffffff }), fc.integer({ min: 0, max: 0xffffffff })).map(([a, b]) => fromWords(0, 0, a, b)),
    );
    fc.assert(
      fc.property(addr, fc.nat({ max: 20 }), (a, at) => check(a, at)),
      { seed: 5952, numRuns: 5000 },
    );
  });
});
