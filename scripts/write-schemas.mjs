// Writes schemas/*.schema.json from the schema objects in the built library, and the plan
// validator compiled from the plan schema (npm run schemas).
import { writeFileSync } from "node:fs";
import { schemaFiles } from "../dist/schemas.js";
import { planValidatorCode } from "../dist/plan/validator-code.js";
for (const [file, schema] of Object.entries(schemaFiles)) {
  writeFileSync(new URL(`../schemas/${file}`, import.meta.url), JSON.stringify(schema, null, 2) + "\n");
  console.log(`schemas/${file}`);
}
// the plan validator, compiled from the plan schema (src/plan/validator-code.ts)
writeFileSync(new URL("../src/plan/plan-validator.generated.ts", import.meta.url), planValidatorCode());
console.log("src/plan/plan-validator.generated.ts");
