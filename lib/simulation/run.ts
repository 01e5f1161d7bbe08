// Node-only: runs a scenario's chunks on a replication pool; used by the CLI and the worker.
import { ChunkFolder, mergeAggregates, type PartialAggregate } from "./aggregate";
import { chunkRange, decideNext, planRun, type PlanDecision, type RunPlan } from "./plan";
import { createReplicationRunner, type ReplicationRunner } from "./pool";
import { SimulationCancelledError } from "./replication";
import { referencesFor, type Reference } from "./references";
import { buildResult, type SimulationResult } from "./result";
import type { Scenario } from "./scenario";

export { SimulationCancelledError, ReplicationJob, runReplication, SLICE_EVENTS } from "./replication";

export interface ChunkOptions {
  runner: ReplicationRunner;
  /** Identifies the scenario for the pool's threads (e.g. the run id). */
  key: string;
  /** Fraction of this chunk done (0..1), non-decreasing. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
}

/** Runs one chunk of the plan and returns its partial aggregate (the same whoever runs it). */
export async function runChunk(scenario: Scenario, plan: RunPlan, chunk: number, options: ChunkOptions): Promise<PartialAggregate> {
  const { firstReplication, replications } = chunkRange(plan, chunk);
  const folder = new ChunkFolder(firstReplication, replications, scenario.servers);
  const fractions = new Float64Array(replications);
  let reported = 0;
  await options.runner.run({
    key: options.key,
    scenario,
    indices: Array.from({ length: replications }, (_, i) => firstReplication + i),
    signal: options.signal,
    onResult: (stats) => folder.add(stats),
    onProgress: options.onProgress
      ? (index, fraction) => {
          fractions[index - firstReplication] = fraction;
          let sum = 0;
          for (const f of fractions) sum += f;
          const value = sum / replications;
          if (value > reported) {
            reported = value;
            options.onProgress!(value);
          }
        }
      : undefined,
  });
  return folder.result();
}

let runKeys = 0;

export interface RunOptions {
  /** Worker threads running replications in parallel; results do not depend on it. */
  threads?: number;
  /** An existing pool to use instead of starting one (it is not closed). */
  runner?: ReplicationRunner;
  /** Fraction of the planned work done, non-decreasing, ending at exactly 1. */
  onProgress?: (fraction: number) => void;
  signal?: AbortSignal;
  /** References already computed for this scenario (the worker computes them once per run). */
  references?: Reference[];
}

/** The fold of chunks [0, chunks) into a result: the one place where a finished run's numbers are made. */
export function finishRun(scenario: Scenario, parts: PartialAggregate[], references: Reference[], decision?: Extract<PlanDecision, { kind: "complete" }>): SimulationResult {
  return buildResult(scenario, mergeAggregates(parts), references, decision?.reason);
}

/**
 * Runs every chunk the plan asks for (and those the precision stop asks for next) and builds the
 * result. Chunks are folded in order and the stop is decided at chunk checkpoints, so the
 * result is bit-identical for any number of threads and equal to a queue run of the same plan.
 */
export async function runScenario(scenario: Scenario, options: RunOptions = {}): Promise<SimulationResult> {
  const threads = Math.max(1, Math.floor(options.threads ?? 1));
  const signal = options.signal;
  if (signal?.aborted) throw new SimulationCancelledError();
  const plan = planRun(scenario);
  const runner = options.runner ?? createReplicationRunner(threads);
  const key = `local-${++runKeys}`;
  const done = new Map<number, PartialAggregate>();
  const running = new Map<number, number>();
  let reported = 0;
  const report = () => {
    if (!options.onProgress) return;
    let reps = 0;
    for (const [chunk] of done) reps += chunkRange(plan, chunk).replications;
    for (const [chunk, f] of running) reps += f * chunkRange(plan, chunk).replications;
    const planned = Math.max(plan.initialReplications, (Math.max(-1, ...done.keys(), ...running.keys()) + 1) * plan.chunkReplications);
    const value = Math.min(0.999999, reps / planned);
    if (value > reported) {
      reported = value;
      options.onProgress(value);
    }
  };
  try {
    // Keep about one chunk per thread beyond the finished prefix in flight.
    const lookahead = Math.max(1, Math.ceil(threads / plan.chunkReplications));
    for (;;) {
      const decision = decideNext(scenario, plan, (c) => done.get(c), lookahead);
      if (decision.kind === "complete") {
        const parts = Array.from({ length: decision.chunks }, (_, c) => done.get(c)!);
        const result = finishRun(scenario, parts, options.references ?? referencesFor(scenario), decision);
        options.onProgress?.(1);
        return result;
      }
      const pending = decision.chunks.filter((c) => !done.has(c));
      await Promise.all(
        pending.map(async (chunk) => {
          running.set(chunk, 0);
          const aggregate = await runChunk(scenario, plan, chunk, {
            runner,
            key,
            signal,
            onProgress: (f) => {
              running.set(chunk, f);
              report();
            },
          });
          running.delete(chunk);
          done.set(chunk, aggregate);
          report();
        }),
      );
      if (signal?.aborted) throw new SimulationCancelledError();
    }
  } finally {
    if (!options.runner) await runner.close();
  }
}
