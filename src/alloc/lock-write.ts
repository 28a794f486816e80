/**
 * The lock's text, written as bytes: the pretty form (the file) and the compact form (hashed for
 * the digest) side by side, straight into two byte buffers. A lock of a million SIDs made as
 * strings (a piece per entry, then joined) kept the garbage collector busy for longer than the
 * writing took. The owners' functions that the fast reader kept as ranges of the lock's bytes
 * (LockedFunctions, unchanged since) are copied from those bytes when they are in the order the
 * text needs, which they are when the lock came from this writer.
 *
 * The bytes are exactly `JSON.stringify({ ...lockBody(lock), digest }, null, 2) + "\n"` in UTF-8,
 * where the digest is the SHA-256 of `JSON.stringify(lockBody(lock))` (tests compare the two on
 * random locks, through both readers).
 */
import { createHash } from "node:crypto";
import { LockedFunctions } from "./lock-functions.js";
import { LOCK_SCHEMA_ID, type Lock, type RetiredValue } from "./lock-model.js";

const utf8 = new TextEncoder();
const HEX = Array.from("0123456789abcdef", (c) => c.charCodeAt(0));

/** A byte buffer that grows. */
class Bytes {
  buf = new Uint8Array(1 << 16);
  pos = 0;
  private readonly scratch = new Uint8Array(16);

  room(n: number): void {
    if (this.pos + n <= this.buf.length) return;
    const b = new Uint8Array(Math.max(this.buf.length * 2, this.pos + n));
    b.set(this.buf.subarray(0, this.pos));
    this.buf = b;
  }

  /** Text known to be ASCII. */
  ascii(s: string): void {
    this.room(s.length);
    const b = this.buf;
    let p = this.pos;
    for (let i = 0; i < s.length; i++) b[p++] = s.charCodeAt(i);
    this.pos = p;
  }

  /** Any text, as UTF-8. */
  text(s: string): void {
    this.room(s.length * 3);
    this.pos += utf8.encodeInto(s, this.buf.subarray(this.pos)).written;
  }

  /** `JSON.stringify(s)`: written as it is when no character needs an escape or more than one byte. */
  quoted(s: string): void {
    for (let i = 0; i < s.length; i++) {
      const c = s.charCodeAt(i);
      if (c < 0x20 || c > 0x7e || c === 0x22 || c === 0x5c) {
        this.text(JSON.stringify(s));
        return;
      }
    }
    this.room(s.length + 2);
    this.buf[this.pos++] = 0x22;
    this.ascii(s);
    this.buf[this.pos++] = 0x22;
  }

  /** Bytes src[a, b). */
  copy(src: Uint8Array, a: number, b: number): void {
    this.room(b - a);
    const buf = this.buf;
    let p = this.pos;
    for (let i = a; i < b; i++) buf[p++] = src[i]!;
    this.pos = p;
  }

  /** `"0x..."`, a lock value (lockValue's form: lower-case hex digits, no leading zeros). */
  value(v: bigint): void {
    this.ascii(`"0x${v.toString(16)}"`);
  }

  /** value() of a whole number 0 <= v < 2^53. */
  valueOfNumber(v: number): void {
    this.room(20);
    const b = this.buf;
    b[this.pos++] = 0x22;
    b[this.pos++] = 0x30;
    b[this.pos++] = 0x78;
    let n = 0;
    let x = v;
    do {
      this.scratch[n++] = HEX[x % 16]!;
      x = Math.floor(x / 16);
    } while (x > 0);
    while (n > 0) b[this.pos++] = this.scratch[--n]!;
    b[this.pos++] = 0x22;
  }
}

/** The lock's text (see above) as UTF-8 bytes, ending in a newline. */
export function serializeLockBytes(lock: Lock): Buffer {
  const hash = createHash("sha256");
  const pretty = new Bytes();
  const compact = new Bytes();
  // the compact form goes to the hash in pieces of about a megabyte
  const flush = (force: boolean) => {
    if (force || compact.pos > 1 << 20) {
      hash.update(compact.buf.subarray(0, compact.pos));
      compact.pos = 0;
    }
  };
  /** ASCII text for both forms. */
  const both = (p: string, c: string) => {
    pretty.ascii(p);
    compact.ascii(c);
  };
  const quotedBoth = (s: string) => {
    pretty.quoted(s);
    compact.quoted(s);
  };
  /** `{ "k": value, ... }` with its members `inner` deep, in JSON.stringify's key order. */
  const object = (keys: readonly string[], value: (k: string) => void, inner: string) => {
    if (keys.length === 0) return both("{}", "{}");
    both("{", "{");
    jsonKeyOrder(keys).forEach((k, i) => {
      both(`${i ? "," : ""}\n${inner}`, i ? "," : "");
      quotedBoth(k);
      both(": ", ":");
      value(k);
      flush(false);
    });
    both(`\n${inner.slice(2)}}`, "}");
  };
  const valueBoth = (v: bigint) => {
    pretty.value(v);
    compact.value(v);
  };

  both(`{\n  "schema": `, `{"schema":`);
  quotedBoth(LOCK_SCHEMA_ID);
  both(`,\n  "plan": `, `,"plan":`);
  quotedBoth(lock.plan);
  both(`,\n  "layout": `, `,"layout":`);
  quotedBoth(lock.layout);
  both(`,\n  "groups": `, `,"groups":`);
  object([...lock.groups.keys()].sort(), (k) => valueBoth(lock.groups.get(k)!), "    ");
  both(`,\n  "nodes": `, `,"nodes":`);
  object(
    [...lock.nodes.keys()].sort(),
    (k) => {
      const n = lock.nodes.get(k)!;
      both(`{\n      "place": `, `{"place":`);
      quotedBoth(n.place);
      both(`,\n      "value": `, `,"value":`);
      valueBoth(n.value);
      both("\n    }", "}");
    },
    "    ",
  );
  both(`,\n  "functions": `, `,"functions":`);
  const owners = jsonKeyOrder([...lock.functions.keys()].sort());
  if (owners.length === 0) both("{}", "{}");
  else {
    both("{", "{");
    owners.forEach((owner, i) => {
      const m = lock.functions.get(owner)!;
      both(`${i ? "," : ""}\n    `, i ? "," : "");
      quotedBoth(owner);
      both(": ", ":");
      if (m instanceof LockedFunctions && m.size > 0 && m.inTextOrder()) copiedFunctions(m, pretty, compact, flush);
      else object([...m.keys()].sort(), (k) => valueBoth(m.get(k)!), "      ");
    });
    both("\n  }", "}");
  }
  const retired = sortedRetired(lock.retired);
  both(`,\n  "retired": `, `,"retired":`);
  if (retired.length === 0) both("[]", "[]");
  else {
    both("[", "[");
    retired.forEach((r, i) => {
      both(`${i ? "," : ""}\n    {\n      "kind": `, `${i ? "," : ""}{"kind":`);
      quotedBoth(r.kind);
      both(`,\n      "space": `, `,"space":`);
      quotedBoth(r.space);
      both(`,\n      "value": `, `,"value":`);
      valueBoth(r.value);
      both(`,\n      "was": `, `,"was":`);
      quotedBoth(r.was);
      both("\n    }", "}");
      flush(false);
    });
    both("\n  ]", "]");
  }
  compact.ascii("}");
  flush(true);
  pretty.ascii(`,\n  "digest": "sha256:${hash.digest("hex")}"\n}\n`);
  return Buffer.from(pretty.buf.buffer, 0, pretty.pos);
}

/** One owner's functions, copied from the lock's bytes they were read from (in text order, see LockedFunctions.inTextOrder). */
function copiedFunctions(m: LockedFunctions, pretty: Bytes, compact: Bytes, flush: (force: boolean) => void): void {
  const s = m.store;
  const src = s.bytes;
  pretty.ascii("{");
  compact.ascii("{");
  for (let e = m.from; e < m.to; e++) {
    const first = e === m.from;
    pretty.ascii(first ? '\n      "' : ',\n      "');
    compact.ascii(first ? '"' : ',"');
    // a plain key: printable ASCII without a quote or backslash, so JSON.stringify leaves it as it is
    const a = s.keyStartAt(e);
    const b = s.keyEndAt(e);
    pretty.copy(src, a, b);
    compact.copy(src, a, b);
    pretty.ascii('": ');
    compact.ascii('":');
    const v = s.numberAt(e);
    if (v >= 0) {
      pretty.valueOfNumber(v);
      compact.valueOfNumber(v);
    } else {
      const big = s.valueAt(e);
      pretty.value(big);
      compact.value(big);
    }
    flush(false);
  }
  pretty.ascii("\n    }");
  compact.ascii("}");
}

function cmp(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/**
 * Keys in the order JSON.stringify prints an object made from them in this order: array-index
 * keys ("0", "17") first, ascending as numbers, then the others as given (ECMA-262
 * OrdinaryOwnPropertyKeys).
 */
export function jsonKeyOrder(keys: readonly string[]): string[] {
  const index: string[] = [];
  const other: string[] = [];
  for (const k of keys) (isArrayIndex(k) ? index : other).push(k);
  if (index.length === 0) return other;
  index.sort((a, b) => Number(a) - Number(b));
  return [...index, ...other];
}

function isArrayIndex(k: string): boolean {
  return /^(0|[1-9][0-9]*)$/.test(k) && Number(k) < 4294967295;
}

/** The retired values in the lock's order: kind, space, value, then what held them. */
export function sortedRetired(list: readonly RetiredValue[]): RetiredValue[] {
  return [...list].sort((a, b) => cmp(a.kind, b.kind) || cmp(a.space, b.space) || (a.value < b.value ? -1 : a.value > b.value ? 1 : 0) || cmp(a.was, b.was));
}
