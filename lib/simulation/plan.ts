import { aggregateCalls, mergeAggregates, type PartialAggregate } from "./aggregate";
import { ratioInterval } from "./estimators";
import { callCongestionEstimate } from "./variance-reduction";
import { LIMITS, freshCallRate, lawMean, type Scenario } from "./scenario";

/**
 * The run plan and the precision stop as pure functions, shared by the CLI's thread pool and the
 * queue orchestrator. The stopping rule is evaluated only at chunk boundaries ("checkpoints"),
 * in chunk order, on the contiguous prefix of finished chunks; chunks finished beyond the
 * stopping checkpoint (run speculatively by other workers) are discarded. So a run stops at the
 * same replication count, with the same estimates, whatever the number of workers or threads.
 */

/** The precision stop never decides on fewer replications than this (a t interval on 1-3 degrees of freedom is too unstable to stop on). */
export const PRECISION_MIN_REPLICATIONS = 10;

/** Aim for chunks of about this many fresh calls (~0.1-0.5 s of one core), so queue overhead stays small. */
const CALLS_PER_CHUNK = 1_000_000;
const MAX_CHUNK_REPLICATIONS = 50;

/** Fresh calls a replication measures (or, for horizon runs, about how many), warm-up excluded. */
export function expectedCallsPerReplication(scenario: Scenario): number {
  const run = scenario.run;
  return run.callsPerReplication ?? (run.horizon ?? 0) * freshCallRate(scenario.arrivals, lawMean(scenario.holding));
}

export interface RunPlan {
  /** Replications per chunk (the last chunk of a run may be cut short by `maxReplications`). */
  chunkReplications: number;
  /** Replications always run (scenario.run.replications). */
  initialReplications: number;
  /** Upper bound on replications (the initial ones without a precision target). */
  maxReplications: number;
  precision?: { relativeHalfWidth: number; maxCalls: number; minReplications: number };
}

/** The plan is a pure function of the scenario (its optional `run.chunkReplications` included). */
export function planRun(scenario: Scenario): RunPlan {
  const run = scenario.run;
  const perReplication = Math.max(1, expectedCallsPerReplication(scenario));
  const chunkReplications =
    run.chunkReplications ?? Math.max(1, Math.min(MAX_CHUNK_REPLICATIONS, run.replications, Math.floor(CALLS_PER_CHUNK / perReplication)));
  return {
    chunkReplications,
    initialReplications: run.replications,
    maxReplications: run.precision ? LIMITS.replications : run.replications,
    precision: run.precision
      ? { ...run.precision, minReplications: Math.max(run.replications, PRECISION_MIN_REPLICATIONS) }
      : undefined,
  };
}

export function chunkCount(plan: RunPlan, replications: number): number {
  return Math.ceil(replications / plan.chunkReplications);
}

/** Replications [firstReplication, firstReplication + replications) of a chunk. */
export function chunkRange(plan: RunPlan, chunk: number): { firstReplication: number; replications: number } {
  const firstReplication = chunk * plan.chunkReplications;
  const replications = Math.min(plan.chunkReplications, plan.maxReplications - firstReplication);
  if (chunk < 0 || !Number.isInteger(chunk) || replications <= 0) throw new Error(`chunk ${chunk} is outside the plan`);
  return { firstReplication, replications };
}

/**
 * Relative half-width of the call-congestion interval; Infinity when it cannot be trusted (no
 * blocking seen, zero standard error). With the scenario it is the interval the result reports
 * (variance-reduced, see variance-reduction.ts), else the direct count's.
 */
export function callCongestionPrecision(aggregate: PartialAggregate, confidence: number, scenario?: Scenario): number {
  const ci = scenario
    ? callCongestionEstimate(scenario, aggregate.records, confidence)
    : ratioInterval(
        aggregate.records.map((r) => r.blockedFirst),
        aggregate.records.map((r) => r.calls),
        confidence,
      );
  // Why: a zero standard error (no blocked call in any replication) is no evidence of precision.
  if (!(ci.estimate > 0) || !(ci.standardError > 0) || !Number.isFinite(ci.halfWidth)) return Infinity;
  return ci.halfWidth / ci.estimate;
}

export type PlanDecision =
  /** Chunks that should be queued, running or done by now (the caller starts those it has not). */
  | { kind: "continue"; chunks: number[] }
  /** The run is complete: its result is the fold of chunks [0, chunks). */
  | { kind: "complete"; chunks: number; reason: "planned" | "precision-met" | "call-budget" | "replication-limit" };

/**
 * Given the chunks finished so far, what next? `lookahead` is how many chunks beyond the finished
 * prefix may run speculatively (e.g. the number of workers); it changes speed, never the result.
 */
export function decideNext(
  scenario: Scenario,
  plan: RunPlan,
  finished: (chunk: number) => PartialAggregate | undefined,
  lookahead = 1,
): PlanDecision {
  const initialChunks = chunkCount(plan, plan.initialReplications);
  let prefix = 0;
  while (finished(prefix)) prefix++;
  if (!plan.precision) {
    if (prefix >= initialChunks) return { kind: "complete", chunks: initialChunks, reason: "planned" };
    return { kind: "continue", chunks: range(0, initialChunks) };
  }
  const maxChunks = chunkCount(plan, plan.maxReplications);
  if (prefix >= initialChunks) {
    const parts: PartialAggregate[] = [];
    for (let k = 0; k < prefix; k++) parts.push(finished(k)!);
    // Checkpoints k = initialChunks-1 .. prefix-1, in order; the first that says stop wins.
    let folded = mergeAggregates(parts.slice(0, initialChunks));
    for (let k = initialChunks - 1; k < prefix; k++) {
      if (k >= initialChunks) folded = mergeAggregates([folded, parts[k]]);
      const stop = stopReason(scenario, plan, folded, k, maxChunks);
      if (stop) return { kind: "complete", chunks: k + 1, reason: stop };
    }
  }
  const last = Math.min(maxChunks, Math.max(initialChunks, prefix + Math.max(1, lookahead)));
  return { kind: "continue", chunks: range(0, last) };
}

function stopReason(
  scenario: Scenario,
  plan: RunPlan,
  prefix: PartialAggregate,
  checkpoint: number,
  maxChunks: number,
): "precision-met" | "call-budget" | "replication-limit" | undefined {
  const precision = plan.precision!;
  const replications = prefix.records.length;
  if (replications >= precision.minReplications && callCongestionPrecision(prefix, scenario.run.confidence, scenario) <= precision.relativeHalfWidth) return "precision-met";
  if (checkpoint + 1 >= maxChunks) return "replication-limit";
  // The budget rule looks one chunk ahead at the mean calls per replication so far.
  const calls = aggregateCalls(prefix);
  const next = chunkRange(plan, checkpoint + 1).replications;
  if (calls + (calls / Math.max(1, replications)) * next > precision.maxCalls) return "call-budget";
  return undefined;
}

function range(from: number, to: number): number[] {
  return Array.from({ length: Math.max(0, to - from) }, (_, i) => from + i);
}
