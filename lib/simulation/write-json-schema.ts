// Regenerates scenario.schema.json from the zod schema: `npm run schema:scenario`.
import { writeFileSync } from "node:fs";
import path from "node:path";
import { scenarioJsonSchemaText } from "./json-schema";

const target = path.join(__dirname, "scenario.schema.json");
writeFileSync(target, scenarioJsonSchemaText());
console.log(`wrote ${path.relative(process.cwd(), target)}`);
