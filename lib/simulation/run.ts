import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { Replication, type ReplicationStats } from "./engine";
import { mser5, ratioInterval } from "./estimators";
import { buildResult, type SimulationResult } from "./result";
import { LIMITS, type Scenario, batchMean, lawMean } from "./scenario";

/** Events per slice between progress reports and cancellation checks (~10-30 ms of work). */
export const SLICE_EVENTS = 1 << 18;

/** Raw observations per replication for MSER-5 (in batches of 5: 1000 batch means). */
const MSER_OBSERVATIONS = 5000;

/** A run stopped through its AbortSignal. */
export class SimulationCancelledError extends Error {
  readonly kind = "cancelled" as const;
  constructor(message = "simulation cancelled") {
    super(message);
    this.name = "SimulationCancelledError";
  }
}

/** Rough rate of fresh calls, only to space the MSER-5 trace in horizon runs. */
function approximateCallRate(scenario: Scenario): number {
  const a = scenario.arrivals;
  switch (a.process) {
    case "poisson":
      return a.rate;
    case "batch":
      return a.rate * batchMean(a.batchSize);
    case "mmpp":
      return Math.max(...a.rates);
    case "on-off":
      return a.onRate;
    case "renewal":
      return 1 / lawMean(a.interarrival);
    case "overflow":
      return a.primaries.reduce((s, p) => s + p.traffic, 0) / lawMean(scenario.holding);
    case "finite-source":
      return a.sources * a.idleRate;
    case "time-varying":
      return Math.max(...a.profile.map((s) => s.rate));
  }
}

/**
 * One replication including, for `warmup: "auto"`, an MSER-5 pilot: the pilot runs the same
 * random streams without warm-up and records the time-average number of busy servers over
 * consecutive groups of fresh calls; MSER-5 picks the truncation point, and the replication is
 * run again discarding that many fresh calls (same streams, so the same trajectory).
 */
export class ReplicationJob {
  private current: Replication;
  private pilot: boolean;
  private readonly traceEvery: number;

  constructor(
    private readonly scenario: Scenario,
    readonly index: number,
  ) {
    this.pilot = scenario.run.warmup === "auto";
    const expectedCalls = scenario.run.callsPerReplication ?? (scenario.run.horizon ?? 0) * approximateCallRate(scenario);
    this.traceEvery = Math.max(1, Math.floor(expectedCalls / MSER_OBSERVATIONS));
    this.current = new Replication(scenario, index, this.pilot ? { warmupCalls: 0, traceEvery: this.traceEvery } : {});
  }

  advance(maxEvents: number): boolean {
    if (!this.current.advance(maxEvents)) return false;
    if (!this.pilot) return true;
    const { traceTime, traceBusy } = this.current;
    const observations: number[] = [];
    for (let i = 1; i < traceTime.length; i++) {
      const dt = traceTime[i] - traceTime[i - 1];
      observations.push(dt > 0 ? (traceBusy[i] - traceBusy[i - 1]) / dt : 0);
    }
    const discard = mser5(observations);
    this.pilot = false;
    // Cutting after `discard` observations starts measuring at trace point `discard`.
    this.current = new Replication(this.scenario, this.index, { warmupCalls: this.current.traceCalls[discard] ?? 0 });
    return false;
  }

  progress(): number {
    const p = this.current.progress();
    return this.scenario.run.warmup === "auto" ? (this.pilot ? p / 2 : 0.5 + p / 2) : p;
  }

  stats(): ReplicationStats {
    return this.current.stats();
  }
}

/** The pure part: one replication, run to the end, depending only on (scenario, index). */
export function runReplication(scenario: Scenario, index: number): ReplicationStats {
  const job = new ReplicationJob(scenario, index);
  while (!job.advance(Number.MAX_SAFE_INTEGER));
  return job.stats();
}

export interface RunOptions {
  /** Worker threads running replications in parallel; results do not depend on it. */
  threads?: number;
  /** Fraction of the planned work done, non-decreasing, ending at exactly 1. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
}

type Runner = (indices: number[], progress: (index: number, fraction: number) => void, onResult?: (stats: ReplicationStats) => void) => Promise<ReplicationStats[]>;

/**
 * Sums occupancy vectors strictly in replication-index order (so the floating-point result does
 * not depend on which thread finished first) and lets each vector go once added: a run of
 * 10 000 replications of 100 000 servers never holds more than a few vectors.
 */
class OccupancyFolder {
  readonly total: Float64Array;
  private next = 0;
  private readonly pending = new Map<number, Float64Array>();
  constructor(servers: number) {
    this.total = new Float64Array(servers + 1);
  }
  add(stats: ReplicationStats): void {
    this.pending.set(stats.index, stats.occupancy);
    stats.occupancy = new Float64Array(0);
    for (let o = this.pending.get(this.next); o; o = this.pending.get(this.next)) {
      for (let k = 0; k < o.length; k++) this.total[k] += o[k];
      this.pending.delete(this.next++);
    }
  }
}

function relativeHalfWidth(stats: ReplicationStats[], confidence: number): number {
  const ci = ratioInterval(
    stats.map((s) => s.blockedFirst),
    stats.map((s) => s.calls),
    confidence,
  );
  return ci.estimate > 0 ? ci.halfWidth / ci.estimate : Infinity;
}

/**
 * Runs all replications (plus those a precision target asks for) and builds the result.
 * Replications are combined in index order and the stopping rule is evaluated replication by
 * replication in that order, so the result is bit-identical for any number of threads.
 */
export async function runScenario(scenario: Scenario, options: RunOptions = {}): Promise<SimulationResult> {
  const threads = Math.max(1, Math.floor(options.threads ?? 1));
  const signal = options.signal;
  if (signal?.aborted) throw new SimulationCancelledError();
  const poolSize = scenario.run.precision ? threads : Math.min(threads, scenario.run.replications);
  const pool = poolSize > 1 ? new WorkerPool(scenario, poolSize, signal) : undefined;
  const runner: Runner = pool
    ? (indices, progress, onResult) => pool.run(indices, progress, onResult)
    : (indices, progress, onResult) => runInThisThread(scenario, indices, progress, signal, onResult);
  const folder = new OccupancyFolder(scenario.servers);
  try {
    const run = scenario.run;
    const initial = run.replications;
    let planned = initial;
    let reported = 0;
    const done = new Map<number, number>();
    const report = (index: number, fraction: number) => {
      if (!options.onProgress) return;
      done.set(index, fraction);
      let sum = 0;
      for (const f of done.values()) sum += f;
      const value = Math.min(0.999999, sum / planned);
      if (value > reported) {
        reported = value;
        options.onProgress(value);
      }
    };
    const results = await runner(
      Array.from({ length: initial }, (_, i) => i),
      report,
      (stats) => folder.add(stats),
    );
    const precision = run.precision;
    if (precision) {
      let calls = results.reduce((s, r) => s + r.calls, 0);
      const wave = Math.max(1, threads);
      let met = relativeHalfWidth(results, run.confidence) <= precision.relativeHalfWidth;
      // Why: the budget rule used to be evaluated once per wave, so with calls varying per
      // replication (horizon runs) two threads could run a replication that one thread's rule
      // refused, breaking the bit-identical guarantee and overshooting maxCalls. It is now
      // evaluated before each replication in index order; a wave only runs ahead speculatively.
      const affordable = () => Math.floor((precision.maxCalls - calls) / Math.max(1, calls / results.length));
      let stop = false;
      while (!met && !stop && results.length < LIMITS.replications) {
        const count = Math.min(wave, affordable(), LIMITS.replications - results.length);
        if (count <= 0) break;
        const start = results.length;
        planned = start + count;
        const extra = await runner(
          Array.from({ length: count }, (_, i) => start + i),
          report,
        );
        for (const r of extra) {
          if (affordable() < 1) {
            stop = true;
            break;
          }
          results.push(r);
          folder.add(r); // only replications up to the stopping one are kept
          calls += r.calls;
          if (relativeHalfWidth(results, run.confidence) <= precision.relativeHalfWidth) {
            met = true;
            break;
          }
        }
      }
    }
    const result = buildResult(scenario, results, folder.total);
    options.onProgress?.(1);
    return result;
  } finally {
    await pool?.close();
  }
}

async function runInThisThread(
  scenario: Scenario,
  indices: number[],
  progress: (index: number, fraction: number) => void,
  signal?: AbortSignal,
  onResult?: (stats: ReplicationStats) => void,
): Promise<ReplicationStats[]> {
  const out: ReplicationStats[] = [];
  for (const index of indices) {
    const job = new ReplicationJob(scenario, index);
    for (;;) {
      const finished = job.advance(SLICE_EVENTS);
      progress(index, finished ? 1 : job.progress());
      if (finished) break;
      // Yield so an abort() from a timer or a message can be seen.
      await new Promise<void>((resolve) => setImmediate(resolve));
      if (signal?.aborted) throw new SimulationCancelledError();
    }
    const stats = job.stats();
    onResult?.(stats);
    out.push(stats);
    if (signal?.aborted) throw new SimulationCancelledError();
  }
  return out;
}

/**
 * The worker entry is TypeScript. `execArgv: ["--import", "tsx"]` does not reach a worker's
 * entry module on Node 20, so a two-line CommonJS bootstrap registers tsx's require hook and
 * then loads the entry; this works the same under the tsx CLI and under vitest.
 */
function workerBootstrap(): string {
  const here = path.dirname(fileURLToPath(moduleUrl()));
  const localRequire = createRequire(path.join(here, "run.ts"));
  const tsxCjs = localRequire.resolve("tsx/cjs");
  return `require(${JSON.stringify(tsxCjs)}); require(${JSON.stringify(path.join(here, "replication-worker.ts"))});`;
}

function moduleUrl(): string {
  // CommonJS under the tsx CLI has __filename; ESM (vitest) has import.meta.url.
  return typeof __filename === "string" ? pathToFileURL(__filename).href : import.meta.url;
}

type WorkerMessage = { type: "progress"; index: number; fraction: number } | { type: "done"; index: number; stats: ReplicationStats } | { type: "error"; message: string };

class WorkerPool {
  private readonly workers: Worker[] = [];
  private failed?: Error;

  constructor(
    private readonly scenario: Scenario,
    threads: number,
    private readonly signal?: AbortSignal,
  ) {
    for (let i = 0; i < threads; i++) {
      this.workers.push(new Worker(workerBootstrap(), { eval: true, workerData: { scenario } }));
    }
  }

  run(indices: number[], progress: (index: number, fraction: number) => void, onResult?: (stats: ReplicationStats) => void): Promise<ReplicationStats[]> {
    return new Promise((resolve, reject) => {
      const results = new Map<number, ReplicationStats>();
      let next = 0;
      let settled = false;
      const cleanups: Array<() => void> = [];
      const finish = (error?: Error) => {
        if (settled) return;
        settled = true;
        for (const c of cleanups) c();
        if (error) {
          this.failed = error;
          reject(error);
        } else resolve(indices.map((i) => results.get(i)!));
      };
      const onAbort = () => finish(new SimulationCancelledError());
      if (this.signal) {
        if (this.signal.aborted) return onAbort();
        this.signal.addEventListener("abort", onAbort, { once: true });
        cleanups.push(() => this.signal!.removeEventListener("abort", onAbort));
      }
      const feed = (worker: Worker) => {
        if (next < indices.length) worker.postMessage({ type: "run", index: indices[next++] });
      };
      for (const worker of this.workers) {
        const onMessage = (message: WorkerMessage) => {
          if (message.type === "progress") progress(message.index, message.fraction);
          else if (message.type === "error") finish(new Error(message.message));
          else {
            results.set(message.index, message.stats);
            onResult?.(message.stats);
            progress(message.index, 1);
            if (results.size === indices.length) finish();
            else feed(worker);
          }
        };
        const onError = (error: Error) => finish(error);
        const onExit = (code: number) => {
          if (!settled) finish(new Error(`replication worker exited with code ${code}`));
        };
        worker.on("message", onMessage);
        worker.on("error", onError);
        worker.on("exit", onExit);
        cleanups.push(() => {
          worker.off("message", onMessage);
          worker.off("error", onError);
          worker.off("exit", onExit);
        });
        feed(worker);
      }
    });
  }

  async close(): Promise<void> {
    // Terminating also stops a replication in progress: that is how cancellation is prompt.
    await Promise.all(this.workers.map((w) => w.terminate()));
    void this.failed;
  }
}
