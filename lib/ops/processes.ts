// A small supervisor: starts the web server, worker and fake mail as child processes and stops them together.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { appendFileSync, existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { projectRoot } from "./environment";

export interface ManagedProcess {
  name: string;
  child: ChildProcess;
}

export interface StartOptions {
  /** Keep the output off the terminal; with `logFile`, append it there instead (the test stack). */
  quiet?: boolean;
  logFile?: string;
  /**
   * Start the process again when it dies (worker processes): after 1 s, doubling up to 30 s while
   * it keeps dying within a minute of starting. Without it an unexpected exit is reported through
   * `onUnexpectedExit` (web server, mail receiver: the stack cannot serve without them).
   */
  restart?: boolean;
}

/** Delay before restart number `failures` (1-based) of a process that keeps dying (common practice, no source). */
export function restartDelayMs(failures: number): number {
  return Math.min(30_000, 1000 * 2 ** Math.max(0, failures - 1));
}

/** A process that ran this long before dying counts as healthy: its next restart waits 1 s again. */
const HEALTHY_RUN_MS = 60_000;

export class Supervisor {
  private processes: ManagedProcess[] = [];
  private timers = new Set<NodeJS.Timeout>();
  private stopping = false;
  onUnexpectedExit: (name: string, code: number | null) => void = () => {};
  onRestart: (name: string, code: number | null, delayMs: number) => void = () => {};

  start(name: string, args: string[], env: NodeJS.ProcessEnv, options: StartOptions = {}, failures = 0): ManagedProcess {
    // Start node directly (not via npx), so the PID we keep is the process we stop.
    const child = spawn(process.execPath, args, { cwd: projectRoot, env, stdio: ["ignore", "pipe", "pipe"] });
    const startedAt = Date.now();
    const prefix = `[${name}] `;
    if (options.logFile) mkdirSync(path.dirname(options.logFile), { recursive: true });
    const forward = (stream: NodeJS.WriteStream) => (chunk: Buffer) => {
      for (const line of chunk.toString().split(/\r?\n/)) {
        if (!line.trim()) continue;
        if (options.logFile) appendFileSync(options.logFile, `${new Date().toISOString()} ${prefix}${line}\n`);
        if (!options.quiet) stream.write(prefix + line + "\n");
      }
    };
    child.stdout?.on("data", forward(process.stdout));
    child.stderr?.on("data", forward(process.stderr));
    const managed = { name, child };
    child.on("exit", (code, signal) => {
      if (this.stopping) return;
      if (!options.restart) return this.onUnexpectedExit(name, code ?? (signal ? 128 : null));
      this.processes = this.processes.filter((p) => p !== managed);
      const next = Date.now() - startedAt >= HEALTHY_RUN_MS ? 1 : failures + 1;
      const delay = restartDelayMs(next);
      this.onRestart(name, code ?? (signal ? 128 : null), delay);
      const timer = setTimeout(() => {
        this.timers.delete(timer);
        if (!this.stopping) this.start(name, args, env, options, next);
      }, delay);
      this.timers.add(timer);
    });
    this.processes.push(managed);
    return managed;
  }

  /** The running processes (a restarted worker appears under the same name with a new child). */
  get running(): readonly ManagedProcess[] {
    return this.processes;
  }

  async stopAll(timeoutMs = 30_000): Promise<void> {
    this.stopping = true;
    for (const timer of this.timers) clearTimeout(timer);
    this.timers.clear();
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

/** Worker processes `npm start` runs: SPILLWAY_WORKERS, default 1 (each runs one replication thread per core). */
export function workerCount(): number {
  const raw = process.env.SPILLWAY_WORKERS;
  if (raw === undefined || raw === "") return 1;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 64) throw new Error(`SPILLWAY_WORKERS must be a whole number from 0 to 64, not "${raw}"`);
  return n;
}

export const nodeWithTsx = (script: string) => ["--import", "tsx", script];
export const nextBin = path.join(projectRoot, "node_modules/next/dist/bin/next");

const buildInputs = ["app", "components", "lib", "db", "public", "proxy.ts", "next.config.ts", "tailwind.config.ts", "postcss.config.mjs", "package-lock.json", "tsconfig.json"];

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
