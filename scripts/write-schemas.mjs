// Writes schemas/*.schema.json from the schema objects in the built library (npm run schemas).
import { writeFileSync } from "node:fs";
import { schemaFiles } from "../dist/schemas.js";
for (const [file, schema] of Object.entries(schemaFiles)) {
  writeFileSync(new URL(`../schemas/${file}`, import.meta.url), JSON.stringify(schema, null, 2) + "\n");
  console.log(`schemas/${file}`);
}
