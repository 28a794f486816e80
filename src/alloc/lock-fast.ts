/**
 * A fast reader for lock files as serializeLock writes them: one pass over the bytes that builds
 * the lock's maps directly (each owner's function keys kept as ranges of the bytes, see
 * lock-functions.ts), and one that hashes the compact JSON (the text without the
 * whitespace between tokens and without the digest member) for the digest check. JSON.parse of a
 * pretty-printed lock of a million SIDs, then JSON.stringify again for the digest, costs several
 * times more.
 *
 * It answers only when it is sure: the layout of a lock (these keys, in this order, strings
 * only), a schema that matches and a digest that matches the compact bytes. Anything else — a
 * hand edit, another shape, a number where a string belongs, a bad value — returns undefined and
 * the caller reads the lock the readable way (JSON.parse), which gives the diagnostics. When the
 * digest matches, the bytes are those serializeLock wrote, so the maps hold what JSON.parse would
 * give, in the same order (tests compare the two on random and damaged locks).
 */
import { type Hash, createHash } from "node:crypto";
import { FunctionStore, LockedFunctions } from "./lock-functions.js";
import { LOCK_SCHEMA_ID, type Lock, type RetiredValue, hexDigit, smallBigInt } from "./lock-model.js";

/** Thrown inside the reader when the bytes are not a lock it is sure of; caught at its end. */
const NOT = new Error("not the lock layout");
const fail = (): never => {
  throw NOT;
};

const QUOTE = 0x22;
/** What stringRest found in a string: an escape, a byte of a multi-byte character. */
const ESCAPED = 1;
const WIDE = 2;
const BACKSLASH = 0x5c;
const KINDS = new Set(["group", "node", "function"]);

/** Bytes as Latin-1 text; Buffer's own latin1Slice where present (toString checks its arguments first). */
type Latin1 = { latin1Slice?: (start: number, end: number) => string };
const latin1 = (b: Buffer, start: number, end: number): string =>
  (b as unknown as Latin1).latin1Slice ? (b as unknown as Required<Latin1>).latin1Slice(start, end) : b.toString("latin1", start, end);

/**
 * Feed the compact form of b[0, end) — every byte except whitespace outside strings — to the
 * hash, a megabyte at a time. Only meaningful for text that parses, which the caller checks.
 */
function hashCompact(hash: Hash, b: Buffer, end: number): void {
  const CHUNK = 1 << 20;
  const out = Buffer.allocUnsafe(CHUNK + 2);
  let o = 0;
  let inString = false;
  for (let i = 0; i < end; i++) {
    const c = b[i]!;
    if (inString) {
      out[o++] = c;
      if (c === BACKSLASH) out[o++] = b[++i]!;
      else if (c === QUOTE) inString = false;
    } else if (c !== 0x20 && c !== 0x0a && c !== 0x0d && c !== 0x09) {
      out[o++] = c;
      if (c === QUOTE) inString = true;
    }
    if (o >= CHUNK) {
      hash.update(out.subarray(0, o));
      o = 0;
    }
  }
  hash.update(out.subarray(0, o));
}

/** The lock in `bytes`, or undefined when the fast reader is not sure (see above). */
export function readLockFast(bytes: Uint8Array): Lock | undefined {
  const b = Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const n = b.length;
  let i = 0;

  const ws = () => {
    while (i < n) {
      const c = b[i]!;
      if (c === 0x20 || c === 0x0a || c === 0x0d || c === 0x09) i++;
      else break;
    }
  };
  const punct = (ch: number) => {
    ws();
    if (b[i] !== ch) fail();
    i++;
  };
  /**
   * Move the cursor over the rest of a string, from inside it to just after its closing quote;
   * gives ESCAPED and WIDE (a byte of a multi-byte character) for what it holds.
   */
  const stringRest = (): number => {
    let seen = 0;
    for (;;) {
      if (i >= n) fail();
      const c = b[i]!;
      if (c === QUOTE) break;
      if (c < 0x20) fail();
      i++;
      if (c === BACKSLASH) {
        i++;
        seen |= ESCAPED;
      } else if (c >= 0x80) seen |= WIDE;
    }
    i++;
    return seen;
  };
  const str = (): string => {
    ws();
    if (b[i] !== QUOTE) fail();
    const open = i++;
    const seen = stringRest();
    const end = i - 1;
    if (seen & ESCAPED) return JSON.parse(b.toString("utf8", open, end + 1)) as string;
    return seen === 0 ? latin1(b, open + 1, end) : b.toString("utf8", open + 1, end);
  };
  /** Set by hexNumber when the value has more than 13 hex digits. */
  let bigValue: bigint | undefined;
  /**
   * A lock value `"0x..."` read from the bytes (lockValue's rules: lower-case hex digits): the
   * value as a number when it has at most 13 hex digits (52 bits, exact), else -1 and the value
   * in `bigValue`.
   */
  const hexNumber = (): number => {
    ws();
    if (b[i] !== QUOTE || b[i + 1] !== 0x30 || b[i + 2] !== 0x78) fail();
    const start = i + 1;
    i += 3;
    let v = 0;
    for (;;) {
      if (i >= n) fail();
      const c = b[i]!;
      if (c === QUOTE) break;
      const d = hexDigit(c);
      if (d < 0) fail();
      v = v * 16 + d;
      i++;
    }
    const digits = i - start - 2;
    i++;
    if (digits === 0) fail();
    if (digits > 13) {
      bigValue = BigInt(latin1(b, start, i - 1));
      return -1;
    }
    return v;
  };
  const hexValue = (): bigint => {
    const v = hexNumber();
    return v >= 0 ? smallBigInt(v) : bigValue!;
  };
  const field = (name: string): void => {
    if (str() !== name) fail();
    punct(0x3a);
  };
  /** `, "name":` — the next member of an object whose keys come in a fixed order. */
  const nextField = (name: string): void => {
    punct(0x2c);
    field(name);
  };
  /** `{ "k": value, ... }`, calling `member` for each key with the cursor at its value. */
  const members = (member: (key: string) => void) => {
    punct(0x7b);
    ws();
    if (b[i] === 0x7d) {
      i++;
      return;
    }
    for (;;) {
      const key = str();
      punct(0x3a);
      member(key);
      ws();
      const c = b[i++];
      if (c === 0x7d) return;
      if (c !== 0x2c) fail();
    }
  };

  try {
    punct(0x7b);
    field("schema");
    if (str() !== LOCK_SCHEMA_ID) return undefined;
    nextField("plan");
    const plan = str();
    nextField("layout");
    const layout = str();
    nextField("groups");
    const groups = new Map<string, bigint>();
    members((k) => groups.set(k, hexValue()));
    nextField("nodes");
    const nodes = new Map<string, { place: string; value: bigint }>();
    members((k) => {
      punct(0x7b);
      field("place");
      const place = str();
      nextField("value");
      const value = hexValue();
      punct(0x7d);
      nodes.set(k, { place, value });
    });
    nextField("functions");
    const functions = new Map<string, Map<string, bigint>>();
    const store = new FunctionStore(b);
    members((owner) => {
      const from = store.count;
      let plain = true;
      punct(0x7b);
      ws();
      if (b[i] === 0x7d) i++;
      else
        for (;;) {
          // the key: `algorithm|rest` is plain when the algorithm is 0..999 in decimal without
          // leading zeros and the rest is printable ASCII without escapes
          ws();
          if (b[i] !== QUOTE) fail();
          const keyStart = ++i;
          let algo = 0;
          while (i < n && b[i]! >= 0x30 && b[i]! <= 0x39) algo = algo * 10 + (b[i++]! - 0x30);
          const digits = i - keyStart;
          let rest = keyStart;
          if (digits > 0 && digits <= 3 && (digits === 1 || b[keyStart] !== 0x30) && b[i] === 0x7c) rest = ++i;
          else plain = false;
          if (stringRest() !== 0) plain = false;
          const end = i - 1;
          punct(0x3a);
          const v = hexNumber();
          store.push(keyStart, rest, end, algo, v, v < 0 ? bigValue : undefined);
          ws();
          const c = b[i++];
          if (c === 0x7d) break;
          if (c !== 0x2c) fail();
        }
      const to = store.count;
      if (plain && store.index(from, to)) functions.set(owner, new LockedFunctions(store, from, to));
      else {
        // an owner with an unusual key, or a key twice: an ordinary Map (the last value of a key wins, as in JSON.parse)
        const m = new Map<string, bigint>();
        for (let e = from; e < to; e++) m.set(store.keyAt(e), store.valueAt(e));
        functions.set(owner, m);
      }
    });
    nextField("retired");
    const retired: RetiredValue[] = [];
    punct(0x5b);
    ws();
    if (b[i] === 0x5d) {
      i++;
    } else {
      for (;;) {
        punct(0x7b);
        field("kind");
        const kind = str();
        if (!KINDS.has(kind)) fail();
        nextField("space");
        const space = str();
        nextField("value");
        const value = hexValue();
        nextField("was");
        const was = str();
        punct(0x7d);
        retired.push({ kind: kind as RetiredValue["kind"], space, value, was });
        ws();
        const c = b[i++];
        if (c === 0x5d) break;
        if (c !== 0x2c) fail();
      }
    }
    // the digest covers the compact form of everything before its own member, closed with "}"
    ws();
    const digestAt = i;
    nextField("digest");
    const digest = str();
    punct(0x7d);
    ws();
    if (i !== n) fail();
    const hash = createHash("sha256");
    hashCompact(hash, b, digestAt);
    if (digest !== "sha256:" + hash.update("}").digest("hex")) return undefined;
    return { plan, layout, groups, nodes, functions, retired };
  } catch (e) {
    if (e === NOT) return undefined;
    if (e instanceof SyntaxError) return undefined;
    throw e;
  }
}
