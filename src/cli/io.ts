/**
 * File input and output for the CLI: reading with located errors, atomic writes (temp file in the
 * same folder, then rename), and the rule that we only overwrite files we wrote ourselves.
 */
import { closeSync, fstatSync, fsyncSync, mkdirSync, openSync, readFileSync, readSync, renameSync, rmSync, statSync, writeSync } from "node:fs";
import { open } from "node:fs/promises";
import { hostname } from "node:os";
import { basename, dirname, join } from "node:path";
import type { Diagnostic } from "../plan/diagnostic.js";

/** Thrown by the CLI helpers for bad usage or unreadable input; main turns it into exit 2. */
export class UsageError extends Error {
  constructor(
    message: string,
    readonly diagnostics: readonly Diagnostic[] = [],
  ) {
    super(message);
  }
}

/** Largest file we read (bytes). */
export const MAX_INPUT_BYTES = 256 * 1024 * 1024;

/** Read a file as bytes; a missing file, a folder or an oversized file is a UsageError. */
export function readInput(file: string): Uint8Array {
  let st;
  try {
    st = statSync(file);
  } catch {
    throw new UsageError(`${file}: no such file`);
  }
  if (st.isDirectory()) throw new UsageError(`${file}: is a folder; give the path of a plan or table file`);
  if (!st.isFile()) throw new UsageError(`${file}: is not a regular file`);
  if (st.size > MAX_INPUT_BYTES) throw new UsageError(`${file}: ${st.size} bytes is larger than the ${MAX_INPUT_BYTES} bytes we read`);
  try {
    return readFileSync(file);
  } catch (e) {
    throw new UsageError(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? "error"})`);
  }
}

/** Read a file's bytes if it exists, else undefined. */
export function readBytesIfExists(file: string): Buffer | undefined {
  return readSharedIfExists(file, Infinity);
}

/**
 * readBytesIfExists, but a file of at least `sharedFrom` bytes is read into shared memory (a
 * SharedArrayBuffer, which a worker thread can read without a copy).
 */
export function readSharedIfExists(file: string, sharedFrom: number): Buffer | undefined {
  let fd: number;
  try {
    fd = openSync(file, "r");
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ENOENT") return undefined;
    throw new UsageError(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? "error"})`);
  }
  try {
    const size = fstatSync(fd).size;
    if (size < sharedFrom || size > MAX_INPUT_BYTES) return readFileSync(fd);
    const b = Buffer.from(new SharedArrayBuffer(size));
    let at = 0;
    for (let n = 1; at < size && n > 0; at += n) n = readSync(fd, b, at, size - at, null);
    return b.subarray(0, at);
  } catch (e) {
    throw new UsageError(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? "error"})`);
  } finally {
    closeSync(fd);
  }
}

/** Whether two file contents (bytes or text, undefined for no file) are the same bytes. */
export function sameContent(a: Buffer | string | undefined, b: Buffer | string | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  // a Buffer as it is (Buffer.from would copy it: a large lock is tens of megabytes)
  const bytes = (x: Buffer | string) => (typeof x === "string" ? Buffer.from(x) : x);
  return bytes(a).equals(bytes(b));
}


/** True when the file at `path` was written by sidcarve (recognised by its first bytes). */
export function isOurFile(path: string): boolean {
  let head = "";
  try {
    const fd = openSync(path, "r");
    try {
      const buf = Buffer.alloc(512);
      head = buf.subarray(0, readSync(fd, buf, 0, 512, 0)).toString("utf8");
    } finally {
      closeSync(fd);
    }
  } catch {
    return false;
  }
  return head.startsWith("# sidcarve ") || /"schema":\s*"sidcarve\//.test(head) || /"driver":\s*\{\s*"name":\s*"sidcarve"/.test(head);
}

export interface WriteOptions {
  /** Overwrite a file that sidcarve did not write. */
  readonly force?: boolean;
}

/**
 * Refuse (UsageError) when any of `paths` is a folder or another non-file, or a file sidcarve did
 * not write (unless `force`). A command that writes several files checks them all first, so that
 * a refusal never leaves half of a set written.
 */
export function checkWritable(paths: readonly string[], options: WriteOptions = {}): void {
  for (const path of paths) {
    let st;
    try {
      st = statSync(path);
    } catch {
      continue; // not there yet
    }
    // A folder (or device) where the file should go: renaming over it would fail after the
    // temporary file was written, so refuse before writing anything.
    if (!st.isFile()) throw new UsageError(`${path}: is ${st.isDirectory() ? "a folder" : "not a regular file"}; refusing to write a table there`);
    if (!options.force && !isOurFile(path)) {
      throw new UsageError(`${path}: exists and was not written by sidcarve; refusing to overwrite it (use --force to allow)`);
    }
  }
}

/** The temporary file beside `path` that an atomic write goes through (its name starts with '.' and holds '.tmp-'). */
function tempBeside(path: string, options: WriteOptions): string {
  const dir = dirname(path);
  mkdirSync(dir, { recursive: true });
  checkWritable([path], options);
  return join(dir, `.${basename(path)}.tmp-${process.pid}-${Math.random().toString(36).slice(2, 10)}`);
}

/** Rename the finished temporary file over `path` (or remove it when that fails). */
function moveInto(tmp: string, path: string): void {
  try {
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
}

const bytesOf = (c: string | Uint8Array): Uint8Array => (typeof c === "string" ? Buffer.from(c, "utf8") : c);

/**
 * Write `chunks` to `path` atomically: into a temporary file in the same folder, flushed, then
 * renamed over the target. Strings are written as UTF-8, byte chunks as they are (each one is
 * written before the next is asked for). An interrupted run leaves the old file untouched (and
 * at worst a stray temporary file whose name starts with '.' and holds '.tmp-').
 */
export function writeAtomic(path: string, chunks: Iterable<string | Uint8Array>, options: WriteOptions = {}): void {
  const tmp = tempBeside(path, options);
  const fd = openSync(tmp, "w", 0o644);
  try {
    for (const c of chunks) {
      const buf = bytesOf(c);
      let off = 0;
      while (off < buf.length) off += writeSync(fd, buf, off);
    }
    fsyncSync(fd);
  } catch (e) {
    closeSync(fd);
    rmSync(tmp, { force: true });
    throw e;
  }
  closeSync(fd);
  moveInto(tmp, path);
}

/**
 * writeAtomic for large outputs: the same temporary file, flush and rename, but each chunk is
 * written by the operating system's thread while the next one is made, so that making the bytes
 * and writing them overlap (one write in flight at a time, so at most two chunks are held). The
 * chunks must be fresh buffers (not one buffer reused), as the CSV and JSON writers give them.
 */
export async function writeAtomicOverlapped(path: string, chunks: Iterable<string | Uint8Array>, options: WriteOptions = {}): Promise<void> {
  const tmp = tempBeside(path, options);
  const fh = await open(tmp, "w", 0o644);
  let inFlight: Promise<void> | undefined;
  const writeAll = async (buf: Uint8Array): Promise<void> => {
    let off = 0;
    while (off < buf.length) off += (await fh.write(buf, off, buf.length - off)).bytesWritten;
  };
  try {
    for (const c of chunks) {
      const buf = bytesOf(c);
      if (inFlight) await inFlight;
      inFlight = writeAll(buf);
      // a failed write is reported at the next await (below or in the next round), not as unhandled
      inFlight.catch(() => {});
    }
    if (inFlight) await inFlight;
    await fh.sync();
  } catch (e) {
    await inFlight?.catch(() => {});
    await fh.close();
    rmSync(tmp, { force: true });
    throw e;
  }
  await fh.close();
  moveInto(tmp, path);
}

/**
 * Run `task(0) .. task(n - 1)` with at most `limit` of them unfinished at a time, starting them in
 * order. When one fails, no further task is started; the ones running are waited for, then the
 * first failure is thrown.
 */
export async function eachAtMost(limit: number, n: number, task: (k: number) => Promise<void>): Promise<void> {
  let next = 0;
  let failed: { error: unknown } | undefined;
  const worker = async (): Promise<void> => {
    while (next < n && !failed) {
      const k = next++;
      try {
        await task(k);
      } catch (e) {
        failed ??= { error: e };
      }
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(limit, n)) }, worker));
  if (failed) throw failed.error;
}

/** After this long a busy marker is taken to be left over from a run that died (ms). */
export const BUSY_STALE_MS = 10 * 60 * 1000;

/** True when `pid` names a live process on this machine. */
function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

/**
 * Run `fn` while holding `<file>.busy`, a marker created exclusively (flag "wx") so that two
 * sidcarve runs never work on one lock file at the same time; the marker is removed afterwards.
 * A marker left by a run that died (its process is gone, or it is older than BUSY_STALE_MS) is
 * taken over; a live one is a UsageError. The marker holds "pid host" for that check.
 */
export function withBusyMarker<T>(file: string, fn: () => T): T {
  const marker = `${file}.busy`;
  const mine = `${process.pid} ${hostname()}\n`;
  mkdirSync(dirname(marker), { recursive: true });
  for (let attempt = 0; ; attempt++) {
    try {
      const fd = openSync(marker, "wx", 0o644);
      try {
        writeSync(fd, mine);
      } finally {
        closeSync(fd);
      }
      break;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
      let holder = "";
      let age = 0;
      try {
        holder = readFileSync(marker, "utf8");
        age = Date.now() - statSync(marker).mtimeMs;
      } catch {
        continue; // it went away between open and read: try again
      }
      const [pid, host] = holder.trim().split(" ");
      const dead = host === hostname() && /^\d+$/.test(pid ?? "") && !isAlive(Number(pid));
      if (attempt < 3 && (dead || age > BUSY_STALE_MS)) {
        rmSync(marker, { force: true });
        continue;
      }
      throw new UsageError(
        `${file}: the lock is in use by another sidcarve run (${marker} was made by process ${pid ?? "?"}${host ? ` on ${host}` : ""}); nothing was written, run again when it has finished (delete ${marker} if no run is active)`,
      );
    }
  }
  try {
    return fn();
  } finally {
    try {
      if (readFileSync(marker, "utf8") === mine) rmSync(marker, { force: true });
    } catch {
      // already gone
    }
  }
}
