// `npm run cli`: runs the command line from its esbuild bundle (.bundles/cli.js), which starts in
// tens of milliseconds instead of transpiling the TypeScript sources on every start. The bundle is
// rebuilt first (lib/ops/bundle.ts, the one bundler and entry table) when any of its inputs changed.
// Plain Node on purpose: this file is what avoids the TypeScript loader.
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const bundleDir = process.env.SPILLWAY_BUNDLE_DIR ?? path.join(root, ".bundles");
const cli = path.join(bundleDir, "cli.js");

/** Same test as lib/ops/bundle.ts: every input recorded in the manifest still has its size and mtime. */
function fresh() {
  if (!existsSync(cli)) return false;
  try {
    const manifest = JSON.parse(readFileSync(path.join(bundleDir, "manifest.json"), "utf8"));
    return Object.entries(manifest.inputs).every(([file, seen]) => {
      const stats = statSync(path.join(root, file), { throwIfNoEntry: false });
      return stats !== undefined && `${stats.size}:${stats.mtimeMs}` === seen;
    });
  } catch {
    return false;
  }
}

if (!fresh()) {
  const built = spawnSync(process.execPath, ["--import", "tsx", path.join(root, "lib/ops/bundle.ts")], { cwd: root, stdio: ["ignore", "ignore", "inherit"] });
  if (built.status !== 0 || !existsSync(cli)) {
    console.error("cli: could not bundle the command line (see lib/ops/bundle.ts); the messages above say why.");
    process.exit(1);
  }
}
createRequire(import.meta.url)(cli);
