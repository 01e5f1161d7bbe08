// Bundles worker-thread entries to plain JavaScript (one file each, dependencies included) so production
// threads start without a TypeScript loader. Run by `npm start` and `npm test`; rebuilds only when an input changed.
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { build } from "esbuild";
import { bundleDir } from "../config";
import { projectRoot } from "./environment";

export interface WorkerEntry {
  /** Output file name without extension: `<bundle dir>/<name>.js`. */
  name: string;
  /** TypeScript source, relative to the project root. */
  source: string;
}

/** Every worker-thread entry of the project. Add a row for a new pool. */
export const workerEntries: WorkerEntry[] = [
  { name: "analytic-worker", source: "lib/analytic-pool/worker.ts" },
  { name: "replication-worker", source: "lib/simulation/replication-worker.ts" },
  { name: "measurement-worker", source: "worker/measurement-thread.ts" },
  // The command line runs from this bundle too (lib/cli/launch.mjs); its pool finds replication-worker.js beside it.
  { name: "cli", source: "lib/cli/main.ts" },
];

export const defaultBundleDir = path.join(projectRoot, ".bundles");

/** npm rewrites this file on every install or `npm ci`. */
const packageRecord = "node_modules/.package-lock.json";

interface Manifest {
  entries: WorkerEntry[];
  inputs: Record<string, string>;
}

const stamp = (file: string) => {
  const stats = statSync(path.join(projectRoot, file));
  return `${stats.size}:${stats.mtimeMs}`;
};

function upToDate(outDir: string, entries: WorkerEntry[]): boolean {
  const manifestFile = path.join(outDir, "manifest.json");
  if (!existsSync(manifestFile)) return false;
  try {
    const manifest = JSON.parse(readFileSync(manifestFile, "utf8")) as Manifest;
    if (JSON.stringify(manifest.entries) !== JSON.stringify(entries)) return false;
    if (!entries.every((e) => existsSync(path.join(outDir, `${e.name}.js`)))) return false;
    return Object.entries(manifest.inputs).every(([file, seen]) => existsSync(path.join(projectRoot, file)) && stamp(file) === seen);
  } catch {
    return false;
  }
}

/** Writes `<outDir>/<name>.js` for every entry unless nothing changed since the last run; returns whether it built. */
export async function bundleWorkers(options: { outDir?: string; entries?: WorkerEntry[]; log?: (line: string) => void } = {}): Promise<boolean> {
  const outDir = options.outDir ?? defaultBundleDir;
  const entries = options.entries ?? workerEntries;
  if (upToDate(outDir, entries)) return false;
  mkdirSync(outDir, { recursive: true });
  const result = await build({
    absWorkingDir: projectRoot,
    entryPoints: Object.fromEntries(entries.map((e) => [e.name, e.source])),
    outdir: outDir,
    bundle: true,
    platform: "node",
    target: "node20",
    format: "cjs",
    // Packages that load native or optional code at run time stay outside the bundle.
    external: ["pg-native"],
    // Why: start-up reads and parses the whole file. Dropping whitespace and comments makes it a
    // quarter smaller and pure ASCII (a comment with one non-ASCII character made Node decode the
    // file into a two-byte string); names are kept, so stack traces still read.
    minifyWhitespace: true,
    metafile: true,
    logLevel: "silent",
  });
  // This file counts as an input too (a change of the build options above rebuilds the bundles), and so
  // does npm's record of the installed packages, which lib/cli/launch.mjs checks instead of every package file.
  const extra = ["lib/ops/bundle.ts", packageRecord].filter((file) => existsSync(path.join(projectRoot, file)));
  const inputs = Object.fromEntries([...Object.keys(result.metafile.inputs), ...extra].map((file) => [file, stamp(file)]));
  writeFileSync(path.join(outDir, "manifest.json"), JSON.stringify({ entries, inputs } satisfies Manifest, null, 1));
  options.log?.(`Bundled ${entries.length} worker entr${entries.length === 1 ? "y" : "ies"} into ${path.relative(projectRoot, outDir)}/.`);
  return true;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  // lib/cli/launch.mjs runs this when the bundle it was pointed at (SPILLWAY_BUNDLE_DIR) is stale.
  bundleWorkers({ outDir: bundleDir() ?? defaultBundleDir, log: console.log }).then(
    (built) => built || console.log("Worker bundles are up to date."),
    (error) => {
      console.error(`bundle: ${error.message}`);
      process.exit(1);
    },
  );
}
