// Entry of `npm start` and `npm test`: plain Node, because TypeScript tooling may not be installed yet.
import { spawnSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const mode = process.argv[2];
if (mode !== "start" && mode !== "test") {
  console.error("usage: node lib/ops/bootstrap.mjs start|test");
  process.exit(2);
}

const installed = path.join(root, "node_modules", ".package-lock.json");
const lock = path.join(root, "package-lock.json");
if (!existsSync(installed) || statSync(lock).mtimeMs > statSync(installed).mtimeMs) {
  console.log("Installing npm packages (npm ci) ...");
  const result = spawnSync("npm", ["ci", "--no-audit", "--no-fund"], { cwd: root, stdio: "inherit" });
  if (result.status !== 0) {
    console.error("npm ci failed; see the messages above.");
    process.exit(result.status ?? 1);
  }
}

const { register } = await import(pathToFileURL(path.join(root, "node_modules/tsx/dist/esm/api/index.mjs")).href);
register();
await import(pathToFileURL(path.join(root, "lib/ops", `${mode}.ts`)).href);
