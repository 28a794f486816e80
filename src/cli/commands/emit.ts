/** `sidcarve emit PLAN --format csv|json [--out DIR] [--per-node]`: write the per-router SID tables. */
import { join } from "node:path";
import { csvByteChunks, csvChunks } from "../../emit/csv.js";
import { jsonChunks } from "../../emit/json.js";
import { safeFileName } from "../../emit/names.js";
import type { Io } from "../context.js";
import { UsageError, checkWritable, writeAtomic } from "../io.js";
import { loadPlanFile, lockPathFor, lockedAllocation } from "../plan-files.js";

export interface EmitFlags {
  readonly lock?: string;
  readonly format: string;
  readonly out?: string;
  readonly perNode?: boolean;
  readonly force?: boolean;
}

export function runEmit(planFile: string, flags: EmitFlags, io: Io): number {
  if (flags.format !== "csv" && flags.format !== "json") throw new UsageError(`--format ${JSON.stringify(flags.format)} is not allowed; use csv or json`);
  const plan = loadPlanFile(planFile);
  const a = lockedAllocation(plan, lockPathFor(planFile, flags.lock));
  const t = a.table;
  const chunks = (nodes: typeof t.nodes) => (flags.format === "csv" ? csvChunks(t.plan, nodes) : jsonChunks(t, nodes));
  // files get CSV as bytes written straight into buffers (the same bytes as the strings' UTF-8)
  const fileChunks = (nodes: typeof t.nodes) => (flags.format === "csv" ? csvByteChunks(t.plan, nodes) : jsonChunks(t, nodes));
  const ext = flags.format;
  if (!flags.out) {
    if (flags.perNode) throw new UsageError("--per-node needs --out DIR (one file per node)");
    for (const c of chunks(t.nodes)) io.out(c);
    return 0;
  }
  if (flags.perNode) {
    const files = t.nodes.map((n) => join(flags.out!, `${safeFileName(n.node)}.${ext}`));
    // check every target first, so a refusal never leaves half a set written
    checkWritable(files, { force: flags.force });
    t.nodes.forEach((n, i) => writeAtomic(files[i]!, fileChunks([n]), { force: flags.force }));
    io.out(`${t.nodes.length} ${ext.toUpperCase()} tables written to ${flags.out}/\n`);
  } else {
    const file = join(flags.out, `${safeFileName(plan.name)}.sids.${ext}`);
    writeAtomic(file, fileChunks(t.nodes), { force: flags.force });
    io.out(`SID table written to ${file}\n`);
  }
  return 0;
}
