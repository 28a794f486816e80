/** The rule reference (docs/rules.md) written from the rule metadata, so the two never drift. */
import { ALL_RULES } from "./rules/index.js";

export function rulesMarkdown(): string {
  const out = [
    "# sidcarve lint rules",
    "",
    "Written from the rule metadata by `npm run docs`; do not edit by hand. `sidcarve rules ID` prints the same.",
    "Severity can be changed per rule in a plan (`lint.severity`); `needs: plan` rules judge SID tables only when `--plan` is given.",
    "",
    "| rule | severity | needs | summary | source |",
    "| --- | --- | --- | --- | --- |",
  ];
  for (const r of ALL_RULES) out.push(`| [\`${r.meta.id}\`](#${r.meta.id}) | ${r.meta.severity} | ${r.meta.needs} | ${r.meta.summary.replace(/\|/g, "\\|")} | ${r.meta.source.replace(/\|/g, "\\|")} |`);
  out.push("");
  for (const r of ALL_RULES) {
    out.push(`## ${r.meta.id}`, "", `**${r.meta.summary}** (default severity ${r.meta.severity}; source: ${r.meta.source})`, "", r.meta.rationale, "");
  }
  return out.join("\n");
}
