/** `sidcarve rules [ID]`: list every lint rule, or explain one. */
import Table from "cli-table3";
import { ALL_RULES, ruleById } from "../../lint/rules/index.js";
import type { Io } from "../context.js";
import { UsageError } from "../io.js";

export function runRules(id: string | undefined, flags: { format?: string }, io: Io): number {
  if (id !== undefined) {
    const r = ruleById(id);
    if (!r) throw new UsageError(`no rule ${JSON.stringify(id)}; \`sidcarve rules\` lists them`);
    if (flags.format === "json") io.out(JSON.stringify(r.meta, null, 2) + "\n");
    else
      io.out(
        [`${r.meta.id} (default severity: ${r.meta.severity}; judges: ${r.meta.needs === "plan" ? "plans, and tables given with --plan" : "plans and SID tables"})`, `  ${r.meta.summary}`, "", `  Why: ${r.meta.rationale}`, `  Source: ${r.meta.source}`].join("\n") + "\n",
      );
    return 0;
  }
  if (flags.format === "json") {
    io.out(JSON.stringify(ALL_RULES.map((r) => r.meta), null, 2) + "\n");
    return 0;
  }
  const t = new Table({ head: ["rule", "severity", "summary", "source"], style: { head: [], border: [] }, wordWrap: true, colWidths: [26, 10, 52, 30] });
  for (const r of ALL_RULES) t.push([r.meta.id, r.meta.severity, r.meta.summary, r.meta.source]);
  io.out(t.toString() + "\n");
  return 0;
}
