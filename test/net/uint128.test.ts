/**
 * The four-word form of an address (the packed tables' columns): toWords and fromWords against
 * the shift-and-mask expressions they stand for, and against ipaddr.js's byte array.
 */
import fc from "fast-check";
import ipaddr from "ipaddr.js";
import { describe, expect, it } from "vitest";
import { formatAddr } from "../../src/net/text.js";
import { ALL_ONES, fromWords, toWords, wordsInto } from "../../src/net/uint128.js";

const word = fc.oneof(fc.integer({ min: 0, max: 0xffffffff }), fc.constantFrom(0, 1, 0x7fffffff, 0x80000000, 0xffffffff));

describe("address words", () => {
  it("fromWords is (w0 << 96) | (w1 << 64) | (w2 << 32) | w3, words taken as unsigned", () => {
    fc.assert(
      fc.property(word, word, word, word, (a, b, c, d) => {
        const ref = (BigInt(a >>> 0) << 96n) | (BigInt(b >>> 0) << 64n) | (BigInt(c >>> 0) << 32n) | BigInt(d >>> 0);
        expect(fromWords(a, b, c, d)).toBe(ref);
        // the same words as signed 32-bit numbers (an Int32Array's) give the same address
        expect(fromWords(a | 0, b | 0, c | 0, d | 0)).toBe(ref);
        expect(toWords(ref)).toEqual([a, b, c, d]);
        const out = new Uint32Array(4);
        wordsInto(ref, out);
        expect([...out]).toEqual([a, b, c, d]);
      }),
      { seed: 5952, numRuns: 5000 },
    );
  });

  it("agrees with ipaddr.js on the bytes of an address", () => {
    // ipaddr.js (a reference library): the 16 bytes of an IPv6 address, most significant first
    fc.assert(
      fc.property(fc.bigInt({ min: 0n, max: ALL_ONES }), (a) => {
        const w = toWords(a);
        const bytes = w.flatMap((x) => [x >>> 24, (x >>> 16) & 255, (x >>> 8) & 255, x & 255]);
        // our text of the address, read by ipaddr.js, gives the bytes the words hold
        expect(ipaddr.parse(formatAddr(a)).toByteArray()).toEqual(bytes);
        expect(fromWords(w[0], w[1], w[2], w[3])).toBe(a);
      }),
      { seed: 4291, numRuns: 2000 },
    );
  });
});
