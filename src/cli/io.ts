/**
 * File input and output for the CLI: reading with located errors, atomic writes (temp file in the
 * same folder, then rename), and the rule that we only overwrite files we wrote ourselves.
 */
import { closeSync, fsyncSync, mkdirSync, openSync, readFileSync, renameSync, rmSync, statSync, writeSync } from "node:fs";
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

/** Read a file as text if it exists, else undefined. */
export function readIfExists(file: string): string | undefined {
  try {
    return readFileSync(file, "utf8");
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ENOENT") return undefined;
    throw new UsageError(`${file}: cannot be read (${(e as NodeJS.ErrnoException).code ?? "error"})`);
  }
}

/** True when the file at `path` was written by sidcarve (recognised by its first bytes). */
export function isOurFile(path: string): boolean {
  let head = "";
  try {
    const buf = readFileSync(path);
    head = buf.subarray(0, 512).toString("utf8");
  } catch {
    return false;
  }
  return head.startsWith("# sidcarve ") || /"schema":\s*"sidcarve\//.test(head);
}

export interface WriteOptions {
  /** Overwrite a file that sidcarve did not write. */
  readonly force?: boolean;
}

/**
 * Write `chunks` to `path` atomically: into a temporary file in the same folder, flushed, then
 * renamed over the target. An interrupted run leaves the old file untouched (and at worst a
 * stray temporary file whose name starts with '.' and holds '.tmp-').
 */
export function writeAtomic(path: string, chunks: Iterable<string>, options: WriteOptions = {}): void {
  const dir = dirname(path);
  mkdirSync(dir, { recursive: true });
  let exists = false;
  try {
    exists = statSync(path).isFile();
  } catch {
    exists = false;
  }
  if (exists && !options.force && !isOurFile(path)) {
    throw new UsageError(`${path}: exists and was not written by sidcarve; refusing to overwrite it (use --force to allow)`);
  }
  const tmp = join(dir, `.${basename(path)}.tmp-${process.pid}-${Math.random().toString(36).slice(2, 10)}`);
  const fd = openSync(tmp, "w", 0o644);
  try {
    for (const c of chunks) {
      const buf = Buffer.from(c, "utf8");
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
  renameSync(tmp, path);
}
