import { z } from "zod";
import type { PartialAggregate, ReplicationRecord } from "./aggregate";
import { ratioInterval, type Interval } from "./estimators";
import { referenceSchema, offeredTraffic, TIME_VARYING_METHODS, type Reference } from "./references";
import { lawMean, type Scenario } from "./scenario";
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

/**
 * One segment of a time-varying profile: the estimates over the parts of the measured period that
 * fall in it (every cycle), with the analytic values there. Intervals are across replications, as
 * for the cycle measures, with the same clipping and zero-event bound (trials: the segment's calls).
 */
const segmentEstimateSchema = z.object({
  index: z.number().int(),
  /** Position in the cycle, and the segment's arrival rate and offered traffic λ h. */
  start: z.number(),
  end: z.number(),
  rate: z.number(),
  offeredTraffic: z.number(),
  /** Fresh calls offered in the segment, their refused first attempts, and the measured time in it, summed over replications. */
  calls: z.number(),
  refused: z.number(),
  time: z.number(),
  /** Refused first attempts / calls offered in the segment; absent when its rate is 0 (no call is ever offered there). */
  callCongestion: intervalSchema.optional(),
  /**
   * Fraction of the segment's time with all servers busy. With none observed the bound is over the
   * segment's calls, so in a segment of rate 0 (no calls) it is [0, 1]: nothing is refused there anyway.
   */
  timeCongestion: intervalSchema,
  /** Retrials or waiting positions: calls that arrived in the segment and were given up / calls offered in it. */
  lossProbability: intervalSchema.optional(),
  /** Call congestion of the references in this segment, where computed: PSA, MOL and the exact periodic solution. */
  psa: z.number().optional(),
  mol: z.number().optional(),
  exact: z.number().optional(),
});
export type SegmentEstimate = z.infer<typeof segmentEstimateSchema>;

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
  /** Time-varying profiles only: estimates per profile segment (sum of segment calls = calls; see segmentEstimateSchema). */
  segments: z.array(segmentEstimateSchema).optional(),
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

/** Time the interval [from, to] spends in each segment of the periodic profile (cycles counted whole, ends by position in the cycle). */
export function segmentTimes(profile: ReadonlyArray<{ duration: number }>, from: number, to: number): number[] {
  const cycle = profile.reduce((a, s) => a + s.duration, 0);
  const out = new Array<number>(profile.length).fill(0);
  if (!(to > from)) return out;
  const first = Math.floor(from / cycle);
  const last = Math.floor(to / cycle);
  const a = from - first * cycle;
  const b = to - last * cycle;
  let start = 0;
  profile.forEach((s, i) => {
    const within = (x: number) => Math.min(Math.max(x - start, 0), s.duration);
    out[i] = Math.max(0, (last - first) * s.duration + within(b) - within(a));
    start += s.duration;
  });
  return out;
}

/** Per-segment estimates of a time-varying run, beside the references' per-segment values. */
function segmentEstimates(scenario: Scenario, stats: readonly ReplicationRecord[], references: Reference[], c: number): SegmentEstimate[] | undefined {
  const a = scenario.arrivals;
  // Records stored before the per-segment counters existed have none.
  if (a.process !== "time-varying" || stats.length === 0 || !stats[0].segmentCalls?.length) return undefined;
  const h = lawMean(scenario.holding);
  const times = stats.map((r) => segmentTimes(a.profile, r.warmupTime, r.warmupTime + r.time));
  const valuesOf = (method: string) => references.find((r) => r.method === method && !r.unavailable)?.segments;
  const psa = valuesOf(TIME_VARYING_METHODS.pointwise);
  const mol = valuesOf(TIME_VARYING_METHODS.modifiedLoad);
  const exact = valuesOf(TIME_VARYING_METHODS.periodic) ?? valuesOf(TIME_VARYING_METHODS.periodicQueue) ?? valuesOf(TIME_VARYING_METHODS.periodicRetrial);
  const sum = (v: number[]) => v.reduce((x, y) => x + y, 0);
  let start = 0;
  return a.profile.map((segment, i) => {
    const calls = stats.map((r) => r.segmentCalls[i]);
    const time = times.map((t) => t[i]);
    const refused = stats.map((r) => r.segmentBlockedFirst[i]);
    const trials = sum(calls);
    const out: SegmentEstimate = {
      index: i,
      start,
      end: start + segment.duration,
      rate: segment.rate,
      offeredTraffic: segment.rate * h,
      calls: trials,
      refused: sum(refused),
      time: sum(time),
      timeCongestion: probability(interval(stats.map((r) => r.segmentAllBusyTime[i]), time, c), trials, c),
    };
    if (segment.rate > 0) {
      out.callCongestion = probability(interval(refused, calls, c), trials, c);
      if (stats[0].segmentLost.length > 0) out.lossProbability = probability(interval(stats.map((r) => r.segmentLost[i]), calls, c), trials, c);
    }
    if (psa?.[i]) out.psa = psa[i].callCongestion;
    if (mol?.[i]) out.mol = mol[i].callCongestion;
    if (exact?.[i]) out.exact = exact[i].callCongestion;
    start += segment.duration;
    return out;
  });
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
  const segments = segmentEstimates(scenario, stats, references, c);
  if (segments) result.segments = segments;
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
