import { z } from "zod";
import type { PartialAggregate, ReplicationRecord } from "./aggregate";
import { ratioInterval, type Interval } from "./estimators";
import { referenceSchema, offeredTraffic, type Reference } from "./references";
import type { Scenario } from "./scenario";
import { callCongestionEstimate } from "./variance-reduction";
import { warningSchema, warningsFor } from "./warnings";

/**
 * An estimate with its Student t interval. For probabilities (call and time congestion, loss,
 * waiting, abandonment, attempt congestion) [ciLow, ciHigh] is clipped to [0, 1]; `halfWidth`
 * stays the unclipped t half-width. When no event was observed the interval is [0, upper] with
 * `upperBoundOnly: true`, the exact one-sided binomial bound 1 - (1 - confidence)^(1/n) over the
 * n trials (calls, attempts or admitted calls).
 */
const intervalSchema = z.object({
  estimate: z.number(),
  standardError: z.number(),
  halfWidth: z.number(),
  ciLow: z.number(),
  ciHigh: z.number(),
  /** How the estimate was made, when not the plain ratio across replications (see variance-reduction.ts). */
  method: z.string().optional(),
  /** No event observed: ciHigh is a one-sided upper confidence bound, not a two-sided interval. */
  upperBoundOnly: z.boolean().optional(),
});

/** What `simulate --json` prints and the worker stores. NaN never appears: JSON has none, so undefined measures are null. */
export const simulationResultSchema = z.object({
  seed: z.number().int(),
  confidence: z.number(),
  replications: z.number().int(),
  /** Fresh calls measured, summed over replications. */
  calls: z.number(),
  /** Events processed, warm-up included. */
  events: z.number(),
  /** Mean offered traffic at the group under study before retrials (erlangs); for overflow, the primaries' total. */
  offeredTraffic: z.number(),
  /** Refused first attempts / fresh calls, by the best valid estimator (`method` says which; see variance-reduction.ts). */
  callCongestion: intervalSchema,
  /** The plain direct count (refused first attempts / fresh calls), always reported beside it. */
  callCongestionDirect: intervalSchema,
  timeCongestion: intervalSchema,
  carriedTraffic: intervalSchema,
  /** With retrials: */
  firstAttemptBlocking: intervalSchema.optional(),
  lossProbability: intervalSchema.optional(),
  attemptsPerCall: intervalSchema.optional(),
  /** Share of all attempts (fresh and repeated) that are refused. */
  attemptCongestion: intervalSchema.optional(),
  /** Time-average number of calls waiting to retry. */
  meanRetrying: intervalSchema.optional(),
  /** With waiting positions: */
  waitingProbability: intervalSchema.optional(),
  meanWait: intervalSchema.optional(),
  meanWaiting: intervalSchema.optional(),
  abandonmentProbability: intervalSchema.optional(),
  /** Time fraction at each busy count 0..servers, pooled over replications. */
  occupancy: z.array(z.number()),
  /** Fresh calls discarded per replication as warm-up (MSER-5 when "auto"): mean, min, max. */
  warmupCalls: z.object({ mean: z.number(), min: z.number(), max: z.number() }),
  /** Simulated time discarded per replication as warm-up. */
  warmupTime: z.object({ mean: z.number(), min: z.number(), max: z.number() }),
  references: z.array(referenceSchema),
  /** Why the run ended where it did: all planned replications, or the precision stop's rule. */
  stopReason: z.enum(["planned", "precision-met", "call-budget", "replication-limit", "cancelled"]),
  /** Per-replication estimates in index order (for the convergence and spread charts). */
  perReplication: z.object({ callCongestion: z.array(z.number()), timeCongestion: z.array(z.number()), calls: z.array(z.number()) }),
  /** Machine-readable reasons not to trust a figure; empty when all is well. */
  warnings: z.array(warningSchema),
  /** Which loop ran the replications (lib/simulation/dispatch.ts); absent in results stored before it was recorded. */
  enginePath: z.enum(["reference", "specialised", "markov"]).optional(),
});
export type SimulationResult = z.infer<typeof simulationResultSchema>;

function summary(values: number[]): { mean: number; min: number; max: number } {
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { mean: sum / values.length, min, max };
}

function interval(y: number[], x: number[], confidence: number): Interval {
  return clean(ratioInterval(y, x, confidence));
}

/** One replication or zero denominators leave no interval; report a zero-width one at the point. */
function clean(ci: Interval): Interval {
  const finite = (v: number, fallback: number) => (Number.isFinite(v) ? v : fallback);
  const estimate = finite(ci.estimate, 0);
  return {
    estimate,
    standardError: finite(ci.standardError, 0),
    halfWidth: finite(ci.halfWidth, 0),
    ciLow: finite(ci.ciLow, estimate),
    ciHigh: finite(ci.ciHigh, estimate),
  };
}

/** Exact one-sided upper confidence bound on a probability when 0 events were seen in n trials (Clopper-Pearson). */
export function zeroEventUpperBound(trials: number, confidence: number): number {
  return trials > 0 ? 1 - Math.pow(1 - confidence, 1 / trials) : 1;
}

/** A probability's interval clipped to [0, 1], or [0, upper bound] when no event was observed in `trials`. */
function probability(ci: Interval, trials: number, confidence: number): Interval {
  if (ci.estimate === 0 && !(ci.standardError > 0)) return { ...ci, ciLow: 0, ciHigh: zeroEventUpperBound(trials, confidence), upperBoundOnly: true };
  return { ...ci, ciLow: Math.max(0, ci.ciLow), ciHigh: Math.min(1, ci.ciHigh) };
}

/** Result fields that are probabilities (clipped to [0, 1]). */
export const PROBABILITY_MEASURES = [
  "callCongestion",
  "callCongestionDirect",
  "timeCongestion",
  "firstAttemptBlocking",
  "lossProbability",
  "attemptCongestion",
  "waitingProbability",
  "abandonmentProbability",
] as const;

/**
 * Builds the stored result from the folded aggregate of a run (see aggregate.ts). References are
 * passed in because the worker computes them once per run and stores them beside the estimates.
 */
export function buildResult(
  scenario: Scenario,
  aggregate: PartialAggregate,
  references: Reference[],
  stopReason: SimulationResult["stopReason"] = "planned",
): SimulationResult {
  const c = scenario.run.confidence;
  const stats = aggregate.records;
  const col = (f: (s: ReplicationRecord) => number) => stats.map(f);
  const calls = col((s) => s.calls);
  const time = col((s) => s.time);
  const admitted = col((s) => s.admitted);
  let totalTime = 0;
  for (const s of stats) totalTime += s.time;
  const occupancy = aggregate.occupancy;
  const warmups = col((s) => s.warmupCalls);
  const sum = (v: number[]) => v.reduce((a, b) => a + b, 0);
  const totalCalls = sum(calls);
  const direct = probability(interval(col((s) => s.blockedFirst), calls, c), totalCalls, c);
  const best = stats.length > 1 ? callCongestionEstimate(scenario, stats, c) : undefined;
  const callCongestion = best && Number.isFinite(best.estimate) && Number.isFinite(best.standardError) ? probability(clean(best), totalCalls, c) : direct;
  if (best && callCongestion !== direct) callCongestion.method = best.method;
  const result: SimulationResult = {
    seed: scenario.run.seed,
    confidence: c,
    replications: stats.length,
    calls: totalCalls,
    events: col((s) => s.events).reduce((a, b) => a + b, 0),
    offeredTraffic: offeredTraffic(scenario),
    callCongestion,
    callCongestionDirect: direct,
    timeCongestion: probability(interval(col((s) => s.allBusyTime), time, c), totalCalls, c),
    carriedTraffic: interval(col((s) => s.busyIntegral), time, c),
    occupancy: occupancy.map((v) => (totalTime > 0 ? v / totalTime : 0)),
    warmupCalls: summary(warmups),
    warmupTime: summary(col((s) => s.warmupTime)),
    references,
    stopReason,
    perReplication: {
      callCongestion: stats.map((s) => (s.calls > 0 ? s.blockedFirst / s.calls : 0)),
      timeCongestion: stats.map((s) => (s.time > 0 ? s.allBusyTime / s.time : 0)),
      calls,
    },
    warnings: [],
    enginePath: stats[0]?.path ?? "reference",
  };
  if (scenario.retrials) {
    result.firstAttemptBlocking = result.callCongestion;
    result.lossProbability = probability(interval(col((s) => s.lost), calls, c), totalCalls, c);
    result.attemptsPerCall = interval(col((s) => s.attempts), calls, c);
    result.attemptCongestion = probability(interval(col((s) => s.blockedAttempts), col((s) => s.attempts), c), sum(col((s) => s.attempts)), c);
    result.meanRetrying = interval(col((s) => s.orbitIntegral), time, c);
  }
  if (scenario.waitingPositions > 0) {
    result.lossProbability ??= probability(interval(col((s) => s.lost), calls, c), totalCalls, c);
    result.waitingProbability = probability(interval(col((s) => s.waited), admitted, c), sum(admitted), c);
    result.meanWait = interval(col((s) => s.waitSum), admitted, c);
    result.meanWaiting = interval(col((s) => s.queueIntegral), time, c);
    result.abandonmentProbability = probability(interval(col((s) => s.abandoned), admitted, c), sum(admitted), c);
  }
  result.warnings = warningsFor(scenario, aggregate, result);
  return result;
}
