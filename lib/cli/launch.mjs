// `npm run cli`: runs the command line from its esbuild bundle (.bundles/cli.js), which starts in
// tens of milliseconds instead of transpiling the TypeScript sources on every start. The bundle is
// rebuilt first (lib/ops/bundle.ts, the one bundler and entry table) when any of its inputs changed.
// Plain Node on purpose: this file is what avoids the TypeScript loader.
import { isAscii } from "node:buffer";
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync, renameSync, statSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";
import vm from "node:vm";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const bundleDir = process.env.SPILLWAY_BUNDLE_DIR ?? path.join(root, ".bundles");
const cli = path.join(bundleDir, "cli.js");

/**
 * Same test as lib/ops/bundle.ts (every input recorded in the manifest still has its size and mtime),
 * except that npm's record of the installed packages, when the manifest has it, stands for the ~500
 * package files: npm rewrites it on every install, and one stat instead of 500 saves about 30 ms a command.
 */
function fresh() {
  if (!existsSync(cli)) return false;
  try {
    const manifest = JSON.parse(readFileSync(path.join(bundleDir, "manifest.json"), "utf8"));
    const packageRecord = "node_modules/.package-lock.json";
    const inputs = Object.entries(manifest.inputs).filter(([file]) => !(packageRecord in manifest.inputs) || file === packageRecord || !file.startsWith("node_modules/"));
    return inputs.every(([file, seen]) => {
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

/**
 * Runs the bundle as CommonJS with a V8 code cache beside it (`cli.js.v8-cache`): compiling the
 * bundle is a large part of a command's start-up, and the cache skips it. The cache is keyed by the
 * bundle's size and time stamp and Node's version and architecture (V8 itself only checks the
 * source's length) and records which commands it has seen: a command new to it writes it again at
 * its end, so it then also holds the functions that command compiled (command modules load lazily).
 * Any trouble with the cache falls back to compiling as usual.
 */
function runBundle(file) {
  // The bundle is ASCII (lib/ops/bundle.ts): decoded as Latin-1 it is the same text, read in a third of the time.
  const bytes = readFileSync(file);
  const source = bytes.toString(isAscii(bytes) ? "latin1" : "utf8");
  const cacheFile = `${file}.v8-cache`;
  const stats = statSync(file);
  const key = `${process.version} ${process.arch} ${stats.size}:${stats.mtimeMs}`;
  const command = (process.argv[2] ?? "").replace(/\s/g, "").slice(0, 40);
  let cachedData;
  let seen = [];
  try {
    const saved = readFileSync(cacheFile);
    const [savedKey, savedCommands] = saved.subarray(0, 4096).toString("latin1").split("\n", 2);
    if (savedKey === key && savedCommands !== undefined) {
      cachedData = saved.subarray(savedKey.length + savedCommands.length + 2);
      seen = savedCommands.split(" ");
    }
  } catch {
    // no cache yet
  }
  const script = new vm.Script(`(function (exports, require, module, __filename, __dirname) {${source}\n})`, {
    filename: file,
    cachedData,
    importModuleDynamically: vm.constants?.USE_MAIN_CONTEXT_DEFAULT_LOADER,
  });
  if (!cachedData || script.cachedDataRejected || !seen.includes(command))
    process.once("exit", () => {
      try {
        const commands = [...(cachedData && !script.cachedDataRejected ? seen : []), command].slice(-64).join(" ");
        const temporary = `${cacheFile}.${process.pid}`;
        writeFileSync(temporary, Buffer.concat([Buffer.from(`${key}\n${commands}\n`, "latin1"), script.createCachedData()]));
        renameSync(temporary, cacheFile);
      } catch {
        // a read-only or full disk only costs the next start its compile time
      }
    });
  const module = { exports: {}, id: file, filename: file, loaded: false };
  script.runInThisContext()(module.exports, createRequire(file), module, file, path.dirname(file));
}

runBundle(cli);
