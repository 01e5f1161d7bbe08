// How long a chunk job may stay active before pg-boss hands it to another worker.
import { chunkRange, expectedCallsPerReplication, type RunPlan, type Scenario } from "../lib/simulation/node";
import { freshCallRate, lawMean } from "../lib/simulation/scenario";

/**
 * A generous bound on one core's time per simulated call: 10 µs, about 20 times what the engine
 * needs for Poisson traffic on this machine (npm run bench), to leave room for retrials, waiting
 * room events and a loaded host (common practice, no source).
 */
const SECONDS_PER_CALL = 10e-6;
/** Floor of every chunk's time limit: job pickup, thread start and database writes. */
const BASE_SECONDS = 10;
/** pg-boss refuses expirations of 24 h or more. */
const MAX_SECONDS = 23 * 3600;

/**
 * The chunk's expiry (expireInSeconds): long enough for a healthy worker to finish it, short enough
 * that a chunk whose worker was killed is run again by another worker within seconds. The same
 * value bounds the handler (pg-boss fails a handler that runs longer), and the worker aborts the
 * chunk just before, so a stuck chunk is retried rather than run twice at once.
 */
export function chunkTimeLimitSeconds(scenario: Scenario, plan: RunPlan, chunk: number): number {
  const { replications } = chunkRange(plan, chunk);
  const meanHolding = lawMean(scenario.holding);
  const rate = freshCallRate(scenario.arrivals, meanHolding);
  const warmup = scenario.run.warmupCalls ?? (scenario.run.warmupTime ?? 0) * rate;
  // Overflow scenarios simulate every primary-group call, not only the overflow ones they measure.
  const a = scenario.arrivals;
  const perMeasuredCall = a.process === "overflow" ? a.primaries.reduce((s, p) => s + p.traffic, 0) / Math.max(1e-9, rate * meanHolding) : 1;
  const calls = replications * (expectedCallsPerReplication(scenario) + warmup) * Math.min(1e6, perMeasuredCall);
  return Math.min(MAX_SECONDS, Math.ceil(BASE_SECONDS + calls * SECONDS_PER_CALL));
}
