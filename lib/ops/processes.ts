// A small supervisor: starts the web server, worker and fake mail as child processes and stops them together.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, readFileSync, readdirSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { projectRoot } from "./environment";

export interface ManagedProcess {
  name: string;
  child: ChildProcess;
}

export class Supervisor {
  private processes: ManagedProcess[] = [];
  private stopping = false;
  onUnexpectedExit: (name: string, code: number | null) => void = () => {};

  start(name: string, args: string[], env: NodeJS.ProcessEnv, options: { quiet?: boolean } = {}): ManagedProcess {
    // Start node directly (not via npx), so the PID we keep is the process we stop.
    const child = spawn(process.execPath, args, { cwd: projectRoot, env, stdio: ["ignore", "pipe", "pipe"] });
    const prefix = `[${name}] `;
    const forward = (stream: NodeJS.WriteStream) => (chunk: Buffer) => {
      if (options.quiet) return;
      for (const line of chunk.toString().split(/\r?\n/)) if (line.trim()) stream.write(prefix + line + "\n");
    };
    child.stdout?.on("data", forward(process.stdout));
    child.stderr?.on("data", forward(process.stderr));
    child.on("exit", (code) => {
      if (!this.stopping) this.onUnexpectedExit(name, code);
    });
    const managed = { name, child };
    this.processes.push(managed);
    return managed;
  }

  async stopAll(timeoutMs = 10_000): Promise<void> {
    this.stopping = true;
    await Promise.all(
      this.processes.reverse().map(
        ({ child }) =>
          new Promise<void>((resolve) => {
            if (child.exitCode !== null || child.signalCode !== null) return resolve();
            const timer = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
            child.once("exit", () => {
              clearTimeout(timer);
              resolve();
            });
            child.kill("SIGTERM");
          }),
      ),
    );
    this.processes = [];
  }
}

export const nodeWithTsx = (script: string) => ["--import", "tsx", script];
export const nextBin = path.join(projectRoot, "node_modules/next/dist/bin/next");

const buildInputs = ["app", "components", "lib", "db", "public", "next.config.ts", "tailwind.config.ts", "postcss.config.mjs", "package-lock.json", "tsconfig.json"];

function fingerprint(): string {
  const hash = createHash("sha256");
  const visit = (entry: string) => {
    const full = path.join(projectRoot, entry);
    if (!existsSync(full)) return;
    const stats = statSync(full);
    if (stats.isDirectory()) {
      for (const child of readdirSync(full).sort()) visit(path.join(entry, child));
    } else {
      hash.update(`${entry}:${stats.size}:${stats.mtimeMs}\n`);
    }
  };
  buildInputs.forEach(visit);
  hash.update(`${process.env.SPILLWAY_DIST_DIR ?? ".next"}`);
  return hash.digest("hex");
}

/** Runs `next build` unless the sources are unchanged since the last build in this dist dir. */
export function buildIfNeeded(env: NodeJS.ProcessEnv, log: (line: string) => void): boolean {
  const distDir = path.join(projectRoot, env.SPILLWAY_DIST_DIR ?? ".next");
  const stamp = path.join(distDir, "spillway-build-fingerprint");
  const current = fingerprint();
  if (existsSync(path.join(distDir, "BUILD_ID")) && existsSync(stamp) && readFileSync(stamp, "utf8") === current) {
    log("The production build is up to date; reusing it.");
    return true;
  }
  log("Building the web app (next build) ...");
  const result = spawnSync(process.execPath, [nextBin, "build"], { cwd: projectRoot, env, stdio: "inherit" });
  if (result.status !== 0) return false;
  writeFileSync(stamp, current);
  return true;
}

export async function waitForHttp(url: string, timeoutMs: number): Promise<boolean> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    try {
      const response = await fetch(url);
      if (response.status < 500) return true;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  return false;
}
