// Writes docs/rules.md from the rule metadata in the built library (npm run docs).
import { writeFileSync } from "node:fs";
import { rulesMarkdown } from "../dist/lint/rules-doc.js";
writeFileSync(new URL("../docs/rules.md", import.meta.url), rulesMarkdown());
console.log("docs/rules.md");
