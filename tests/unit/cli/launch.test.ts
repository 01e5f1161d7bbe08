// lib/cli/launch.mjs: the bundled command line with its V8 code cache. Whatever state the cache is in
// (absent, valid, made for another bundle or Node, damaged), the command prints the same answer.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, statSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { bundleWorkers, workerEntries } from "../../../lib/ops/bundle";

const root = path.join(__dirname, "../../..");
const bundleDir = mkdtempSync(path.join(os.tmpdir(), "spillway-launch-"));
const cacheFile = path.join(bundleDir, "cli.js.v8-cache");

function launch(...args: string[]) {
  const r = spawnSync(process.execPath, [path.join(root, "lib/cli/launch.mjs"), ...args], {
    cwd: root,
    encoding: "utf8",
    env: { ...process.env, SPILLWAY_BUNDLE_DIR: bundleDir },
  });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The cache's header: the key line and the line of commands it has seen. */
const header = () => readFileSync(cacheFile).subarray(0, 4096).toString("latin1").split("\n", 2);

beforeAll(async () => {
  await bundleWorkers({ outDir: bundleDir, entries: workerEntries.filter((e) => e.name === "cli") });
});

describe("launch.mjs code cache", () => {
  it("is written by the first command, reused by the next, and extended by a new command", () => {
    const first = launch("erlang-b", "--servers", "30", "--traffic", "20", "--json");
    expect(first.status).toBe(0);
    expect(JSON.parse(first.stdout).blocking).toBeCloseTo(0.0084575, 6); // Erlang B(30, 20): computed by the recursion, checked in erlang-b.test.ts
    expect(existsSync(cacheFile)).toBe(true);
    const [key, seen] = header();
    expect(key).toContain(process.version);
    expect(seen.split(" ")).toEqual(["erlang-b"]);

    // V8 accepted the cache: a rejected one would have been written again at exit.
    const written = statSync(cacheFile).mtimeMs;
    const second = launch("erlang-b", "--servers", "30", "--traffic", "20", "--json");
    expect(second).toEqual(first);
    expect(statSync(cacheFile).mtimeMs).toBe(written);

    expect(launch("help").status).toBe(0);
    expect(header()[1].split(" ")).toEqual(["erlang-b", "help"]);
  });

  it("falls back to compiling when the cache is damaged or belongs to another bundle, and replaces it", () => {
    const expected = launch("erlang-b", "--servers", "10", "--traffic", "5", "--json");
    expect(expected.status).toBe(0);
    const [key, seen] = header();

    writeFileSync(cacheFile, Buffer.concat([Buffer.from(`${key}\n${seen}\n`, "latin1"), Buffer.from("not a V8 code cache")]));
    expect(launch("erlang-b", "--servers", "10", "--traffic", "5", "--json")).toEqual(expected);
    expect(readFileSync(cacheFile).length).toBeGreaterThan(10_000);

    writeFileSync(cacheFile, Buffer.concat([Buffer.from(`v0.0.0 other 1:2\nerlang-b\n`, "latin1"), readFileSync(cacheFile).subarray(key.length + seen.length + 2)]));
    expect(launch("erlang-b", "--servers", "10", "--traffic", "5", "--json")).toEqual(expected);
    expect(header()[0]).toBe(key);
  });
});
