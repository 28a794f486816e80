/** `sidcarve emit PLAN --format csv|json [--out DIR] [--per-node]`: write the per-router SID tables. */
import { join } from "node:path";
import { csvPackedChunks, textChunks } from "../../emit/csv.js";
import { jsonChunks } from "../../emit/json.js";
import { safeFileName } from "../../emit/names.js";
import type { Io } from "../context.js";
import { UsageError, checkWritable, eachAtMost, writeAtomicOverlapped } from "../io.js";
import { loadLockedAllocation, lockPathFor } from "../plan-files.js";

export interface EmitFlags {
  readonly lock?: string;
  readonly format: string;
  readonly out?: string;
  readonly perNode?: boolean;
  readonly force?: boolean;
}

/** Bytes per chunk written to standard output (a pipe takes them as they come). */
const STDOUT_CHUNK = 64 * 1024;
/** Per-node files written at the same time. */
const PER_NODE_IN_FLIGHT = 8;

export async function runEmit(planFile: string, flags: EmitFlags, io: Io): Promise<number> {
  if (flags.format !== "csv" && flags.format !== "json") throw new UsageError(`--format ${JSON.stringify(flags.format)} is not allowed; use csv or json`);
  const { allocation: a } = await loadLockedAllocation(planFile, lockPathFor(planFile, flags.lock));
  const packed = a.packed;
  // CSV is written from the allocation's columns (no SID objects), JSON from SID objects made a
  // node at a time, to files and to standard output alike
  const ids = packed.nodeIdsByName();
  const names = ids.map((id) => packed.nodeNames[id]!);
  const csv = flags.format === "csv";
  // nodes by their place in `ids` (the order of the table's nodes, see PackedSidTable.toTable);
  // JSON files get each node's SID objects made as it is written, and dropped after
  const fresh = function* (at: readonly number[]) {
    for (const k of at) yield packed.freshNode(ids[k]!);
  };
  const fileChunks = (at: readonly number[]) => (csv ? csvPackedChunks(packed, at.map((k) => ids[k]!)) : jsonChunks(packed, fresh(at)));
  const ext = flags.format;
  if (!flags.out) {
    if (flags.perNode) throw new UsageError("--per-node needs --out DIR (one file per node)");
    // standard output takes text: CSV bytes from the columns in small chunks, decoded as a stream
    // (a chunk may end inside a character), JSON from SID objects made a node at a time
    const chunks = csv ? textChunks(csvPackedChunks(packed, ids, STDOUT_CHUNK)) : jsonChunks(packed, fresh(ids.map((_, k) => k)));
    for (const c of chunks) {
      io.out(c);
      // a pipe to a slower reader: wait for it rather than hold the whole table in memory
      if (io.drained) await io.drained();
    }
    return 0;
  }
  if (flags.perNode) {
    const files = names.map((n) => join(flags.out!, `${safeFileName(n)}.${ext}`));
    // check every target first, so a refusal never leaves half a set written
    checkWritable(files, { force: flags.force });
    // a few files at a time: each one's flush waits for the disk, and the system can flush several
    // at once (one at a time, 1,000 files took three times as long as one file of them all)
    await eachAtMost(PER_NODE_IN_FLIGHT, files.length, (k) => writeAtomicOverlapped(files[k]!, fileChunks([k]), { force: flags.force }));
    io.out(`${ids.length} ${ext.toUpperCase()} tables written to ${flags.out}/\n`);
  } else {
    const file = join(flags.out, `${safeFileName(a.plan.name)}.sids.${ext}`);
    await writeAtomicOverlapped(file, fileChunks(ids.map((_, k) => k)), { force: flags.force });
    io.out(`SID table written to ${file}\n`);
  }
  return 0;
}
