// Entry of `npm start` and `npm test`: plain Node, because TypeScript tooling may not be installed yet.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

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

// The supervisor runs in a child with tsx loaded; signals reach it, and it stops everything it started.
const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "lib/ops", `${mode}.ts`)], { cwd: root, stdio: "inherit" });
for (const signal of ["SIGINT", "SIGTERM", "SIGHUP"]) {
  process.on(signal, () => child.kill(signal));
}
child.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
