// Node-only: a persistent pool of worker threads that run replications of any scenario.
import { createRequire } from "node:module";
import { existsSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import type { ReplicationStats } from "./engine";
import { ReplicationJob, SLICE_EVENTS, SimulationCancelledError } from "./replication";
import type { Scenario } from "./scenario";

/** What a pool is asked to do: replications `indices` of `scenario`, with per-replication progress. */
export interface ReplicationRequest {
  /** Identifies the scenario, so a thread parses and keeps it once (e.g. the run id). */
  key: string;
  scenario: Scenario;
  indices: number[];
  onProgress?: (index: number, fraction: number) => void;
  onResult?: (stats: ReplicationStats) => void;
  signal?: AbortSignal;
}

export interface ReplicationRunner {
  readonly threads: number;
  run(request: ReplicationRequest): Promise<ReplicationStats[]>;
  close(): Promise<void>;
}

/** Runs replications on the calling thread, yielding between slices so aborts and timers are seen. */
export class InlineRunner implements ReplicationRunner {
  readonly threads = 1;
  async run({ scenario, indices, onProgress, onResult, signal }: ReplicationRequest): Promise<ReplicationStats[]> {
    const out: ReplicationStats[] = [];
    for (const index of indices) {
      if (signal?.aborted) throw new SimulationCancelledError();
      const job = new ReplicationJob(scenario, index);
      for (;;) {
        const finished = job.advance(SLICE_EVENTS);
        onProgress?.(index, finished ? 1 : job.progress());
        if (finished) break;
        await new Promise<void>((resolve) => setImmediate(resolve));
        if (signal?.aborted) throw new SimulationCancelledError();
      }
      const stats = job.stats();
      onResult?.(stats);
      out.push(stats);
    }
    return out;
  }
  async close(): Promise<void> {}
}

/**
 * Where a replication thread's code comes from: the bundled JavaScript (built by
 * `lib/ops/bundle.ts`, starts in milliseconds) when present, else the TypeScript source through
 * tsx's require hook (`execArgv: ["--import", "tsx"]` does not reach a worker's entry on Node 20).
 * The bundle is taken from SPILLWAY_BUNDLE_DIR (set by npm start/test right after bundling) or,
 * when this code is itself running from a bundle (the CLI), from beside it: both were built from
 * the same sources. Source runs without the variable never pick up a possibly stale bundle.
 */
function workerSource(): { code: string; eval: true } {
  const here = path.dirname(fileURLToPath(moduleUrl()));
  const dir = process.env.SPILLWAY_BUNDLE_DIR ?? (path.extname(fileURLToPath(moduleUrl())) === ".js" ? here : undefined);
  const bundled = dir ? path.join(dir, "replication-worker.js") : undefined;
  if (bundled && existsSync(bundled)) return { code: `require(${JSON.stringify(bundled)});`, eval: true };
  const localRequire = createRequire(path.join(here, "pool.ts"));
  const tsxCjs = localRequire.resolve("tsx/cjs");
  return { code: `require(${JSON.stringify(tsxCjs)}); require(${JSON.stringify(path.join(here, "replication-worker.ts"))});`, eval: true };
}

function moduleUrl(): string {
  // CommonJS under the tsx CLI has __filename; ESM (vitest) has import.meta.url.
  return typeof __filename === "string" ? pathToFileURL(__filename).href : import.meta.url;
}

type ToWorker = { type: "scenario"; key: string; scenario: Scenario } | { type: "run"; key: string; index: number };
export type FromWorker = { type: "progress"; index: number; fraction: number } | { type: "done"; index: number; stats: ReplicationStats } | { type: "error"; message: string };

interface Task {
  request: ReplicationRequest;
  index: number;
  resolve: (stats: ReplicationStats) => void;
  reject: (error: Error) => void;
}

interface Slot {
  worker: Worker;
  keys: Set<string>;
  task?: Task;
}

/**
 * Threads pull replications from one FIFO queue, so several chunks (of several runs) can share
 * the pool. Cancelling a request terminates the threads running its replications (that is what
 * makes cancellation prompt) and starts fresh ones in their place.
 */
export class ThreadRunner implements ReplicationRunner {
  private readonly slots: Slot[] = [];
  private readonly queue: Task[] = [];
  private closed = false;

  constructor(readonly threads: number) {
    for (let i = 0; i < threads; i++) this.slots.push(this.spawn());
  }

  private spawn(): Slot {
    const source = workerSource();
    const slot: Slot = { worker: new Worker(source.code, { eval: source.eval }), keys: new Set() };
    slot.worker.on("message", (message: FromWorker) => this.onMessage(slot, message));
    slot.worker.on("error", (error) => this.fail(slot, error));
    slot.worker.on("exit", (code) => {
      if (!this.closed && slot.task) this.fail(slot, new Error(`replication thread exited with code ${code}`));
    });
    return slot;
  }

  private onMessage(slot: Slot, message: FromWorker) {
    const task = slot.task;
    if (!task) return;
    if (message.type === "progress") task.request.onProgress?.(message.index, message.fraction);
    else if (message.type === "error") this.fail(slot, new Error(message.message));
    else {
      slot.task = undefined;
      task.request.onProgress?.(message.index, 1);
      task.resolve(message.stats);
      this.pump();
    }
  }

  private fail(slot: Slot, error: Error) {
    const task = slot.task;
    slot.task = undefined;
    this.replace(slot);
    task?.reject(error);
    this.pump();
  }

  private replace(slot: Slot) {
    const i = this.slots.indexOf(slot);
    if (i < 0) return;
    void slot.worker.terminate();
    if (!this.closed) this.slots[i] = this.spawn();
  }

  private pump() {
    if (this.closed) return;
    for (const slot of this.slots) {
      if (slot.task) continue;
      const task = this.queue.shift();
      if (!task) return;
      slot.task = task;
      const { key, scenario } = task.request;
      if (!slot.keys.has(key)) {
        // Threads keep the last few scenarios they were sent, so a chunk's scenario crosses once.
        if (slot.keys.size >= 8) slot.keys.clear();
        slot.worker.postMessage({ type: "scenario", key, scenario } satisfies ToWorker);
        slot.keys.add(key);
      }
      slot.worker.postMessage({ type: "run", key, index: task.index } satisfies ToWorker);
    }
  }

  run(request: ReplicationRequest): Promise<ReplicationStats[]> {
    if (this.closed) return Promise.reject(new Error("the replication pool is closed"));
    const { signal } = request;
    if (signal?.aborted) return Promise.reject(new SimulationCancelledError());
    const tasks: Task[] = [];
    const promises = request.indices.map(
      (index) =>
        new Promise<ReplicationStats>((resolve, reject) => {
          tasks.push({ request, index, resolve, reject });
        }),
    );
    const onAbort = () => {
      const error = new SimulationCancelledError();
      for (const task of tasks) {
        const queued = this.queue.indexOf(task);
        if (queued >= 0) this.queue.splice(queued, 1);
        task.reject(error);
      }
      for (const slot of this.slots) {
        if (slot.task && tasks.includes(slot.task)) {
          slot.task = undefined;
          this.replace(slot);
        }
      }
      this.pump();
    };
    signal?.addEventListener("abort", onAbort, { once: true });
    this.queue.push(...tasks);
    this.pump();
    const all = Promise.all(
      promises.map((p) =>
        p.then((stats) => {
          request.onResult?.(stats);
          return stats;
        }),
      ),
    );
    return all
      .catch((error) => {
        // One replication failed: drop its siblings still waiting, the request is lost anyway.
        for (const task of tasks) {
          const queued = this.queue.indexOf(task);
          if (queued >= 0) this.queue.splice(queued, 1);
        }
        throw error;
      })
      .finally(() => signal?.removeEventListener("abort", onAbort));
  }

  async close(): Promise<void> {
    this.closed = true;
    for (const task of this.queue.splice(0)) task.reject(new SimulationCancelledError("the replication pool was closed"));
    await Promise.all(this.slots.map((s) => s.worker.terminate()));
  }
}

export function createReplicationRunner(threads: number): ReplicationRunner {
  return threads > 1 ? new ThreadRunner(threads) : new InlineRunner();
}
