/** `sidcarve decode ADDRESS... --plan PLAN`: explain addresses against an allocated plan. */
import { Decoder } from "../../alloc/decode.js";
import { parseAddr } from "../../net/text.js";
import type { Io } from "../context.js";
import { UsageError } from "../io.js";
import { loadLockedAllocation, lockPathFor } from "../plan-files.js";

export interface DecodeFlags {
  readonly plan: string;
  readonly lock?: string;
  readonly format?: string;
}

export async function runDecode(addresses: readonly string[], flags: DecodeFlags, io: Io): Promise<number> {
  const parsed = addresses.map((a) => {
    const r = parseAddr(a);
    if (!r.ok) throw new UsageError(r.reason);
    return r.value;
  });
  const { allocation } = await loadLockedAllocation(flags.plan, lockPathFor(flags.plan, flags.lock));
  const decoder = new Decoder(allocation);
  const results = parsed.map((a) => decoder.decode(a));
  if (flags.format === "json") {
    io.out(JSON.stringify(results, null, 2) + "\n");
    return 0;
  }
  for (const d of results) {
    const lines = [`${d.address}`];
    if (d.block) {
      lines.push(`  block      ${d.block} ${d.blockPrefix}`, `  algorithm  ${d.algorithm ?? "?"}`);
      for (const l of d.levels) lines.push(`  ${l.level.padEnd(10)} ${l.value}${l.group ? ` (${l.group})` : ""}`);
      lines.push(`  locator    ${d.locator}${d.owners.length ? ` of ${d.owners.join(", ")}` : ""}`, `  function   ${d.function}`, `  argument   ${d.argument}`);
      if (d.sid) {
        const ctx = Object.entries(d.sid.context).map(([k, v]) => `${k}=${v}`).join(" ");
        lines.push(`  behavior   ${d.sid.behavior}${d.sid.flavors.length ? ` with ${d.sid.flavors.join(", ")}` : ""} (codepoint ${d.sid.codepoint ?? "none"})${ctx ? ` ${ctx}` : ""}`);
      }
    }
    lines.push(`  note       ${d.note}`);
    io.out(lines.join("\n") + "\n");
  }
  return 0;
}
