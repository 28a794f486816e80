/**
 * The two atomic writers: writeAtomic (one chunk after the other) and writeAtomicOverlapped (each
 * chunk written while the next is made) leave the same bytes, leave no temporary file behind, and
 * on a failure part-way leave the old file as it was.
 */
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { UsageError, eachAtMost, writeAtomic, writeAtomicOverlapped } from "../../src/cli/io.js";

const dir = mkdtempSync(join(tmpdir(), "sidcarve-write-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Chunks of varied sizes (0 bytes, one byte, a megabyte and more), strings and bytes mixed. */
function* chunks(seed: number): Generator<string | Uint8Array> {
  let x = seed;
  const next = () => (x = (x * 1103515245 + 12345) >>> 0);
  yield "# sidcarve test file\n";
  for (let i = 0; i < 40; i++) {
    const size = [0, 1, 7, 4096, 1 << 20, (1 << 20) + 3][next() % 6]!;
    const b = new Uint8Array(size);
    for (let j = 0; j < size; j += 97) b[j] = next() & 0xff;
    yield i % 3 === 0 ? `line ${i}: é ✓\n` : b;
  }
}

const concat = (it: Iterable<string | Uint8Array>) => Buffer.concat([...it].map((c) => (typeof c === "string" ? Buffer.from(c, "utf8") : Buffer.from(c))));
const strays = () => readdirSync(dir).filter((f) => f.includes(".tmp-"));

describe("atomic writes", () => {
  it("both writers leave the bytes of the chunks, and no temporary file", async () => {
    for (const seed of [1, 2, 3]) {
      const want = concat(chunks(seed));
      writeAtomic(join(dir, "sync.txt"), chunks(seed));
      await writeAtomicOverlapped(join(dir, "overlapped.txt"), chunks(seed));
      expect(readFileSync(join(dir, "sync.txt")).equals(want)).toBe(true);
      expect(readFileSync(join(dir, "overlapped.txt")).equals(want)).toBe(true);
    }
    await writeAtomicOverlapped(join(dir, "empty.txt"), []);
    expect(readFileSync(join(dir, "empty.txt")).length).toBe(0);
    expect(strays()).toEqual([]);
  });

  it("a chunk source that fails part-way leaves the old file and no temporary file", async () => {
    const target = join(dir, "kept.txt");
    writeFileSync(target, "# sidcarve old bytes\n");
    function* failing(): Generator<Uint8Array> {
      yield new Uint8Array(1 << 20);
      yield new Uint8Array(1 << 20);
      throw new Error("source failed");
    }
    await expect(writeAtomicOverlapped(target, failing())).rejects.toThrow("source failed");
    expect(readFileSync(target, "utf8")).toBe("# sidcarve old bytes\n");
    expect(strays()).toEqual([]);
  });

  it("refuses a file sidcarve did not write, before making a temporary file", async () => {
    const target = join(dir, "theirs.txt");
    writeFileSync(target, "someone else's notes\n");
    await expect(writeAtomicOverlapped(target, ["# sidcarve new\n"])).rejects.toBeInstanceOf(UsageError);
    expect(readFileSync(target, "utf8")).toBe("someone else's notes\n");
    await writeAtomicOverlapped(target, ["# sidcarve new\n"], { force: true });
    expect(readFileSync(target, "utf8")).toBe("# sidcarve new\n");
    expect(strays()).toEqual([]);
  });
});

describe("eachAtMost", () => {
  const pause = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

  it("runs every task, starting them in order, with at most `limit` unfinished", async () => {
    for (const [limit, n] of [[1, 5], [3, 10], [8, 3], [4, 0]] as const) {
      let running = 0;
      let most = 0;
      const started: number[] = [];
      await eachAtMost(limit, n, async (k) => {
        started.push(k);
        running++;
        most = Math.max(most, running);
        await pause((k * 7) % 3);
        running--;
      });
      expect(started).toEqual(Array.from({ length: n }, (_, k) => k));
      expect(most).toBe(Math.min(limit, n));
      expect(running).toBe(0);
    }
  });

  it("starts nothing after a failure, waits for the running tasks, and throws the first failure", async () => {
    const started: number[] = [];
    const finished: number[] = [];
    const run = eachAtMost(3, 20, async (k) => {
      started.push(k);
      await pause(k === 4 ? 1 : 5);
      if (k === 4) throw new Error("task 4 failed");
      finished.push(k);
    });
    await expect(run).rejects.toThrow("task 4 failed");
    // 0-2 ran first; 3 and 4 took the places of the first two done (which may be any of them); the
    // tasks running when 4 failed were waited for, and none started after it
    expect(started.length).toBeLessThan(20);
    expect(finished.sort((a, b) => a - b)).toEqual(started.filter((k) => k !== 4).sort((a, b) => a - b));
  });
});
