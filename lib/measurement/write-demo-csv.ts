/** Writes the demo call-record file: `npx tsx lib/measurement/write-demo-csv.ts`. Deterministic (seeded). */
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { DEMO_CSV_PATH, demoCsv } from "./demo";

const target = path.resolve(process.cwd(), DEMO_CSV_PATH);
mkdirSync(path.dirname(target), { recursive: true });
const text = demoCsv();
writeFileSync(target, text);
console.log(`${DEMO_CSV_PATH}: ${text.split("\n").length - 2} calls, ${(text.length / 1024).toFixed(0)} kB`);
