import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { aggregateReplications } from "./aggregate";
import { RELAXATION_TIMES_PER_REPLICATION, relaxationTime, UNSEEN_SHARE_LIMIT, unseenMeanShare } from "./diagnostics";
import { ReplicationJob, runReplication, SimulationCancelledError } from "./replication";
import type { ReplicationStats } from "./engine";
import { buildResult } from "./result";
import { freshCallRate, lawMean, type Law, type Scenario } from "./scenario";

/**
 * Run-length planning: before a run, about how many calls (and seconds) the requested relative
 * precision of call congestion needs. Pure: the same scenario and options give the same answer
 * (the pilot runs fixed replications of the scenario's own seed).
 *
 * - Erlang model (Poisson arrivals, exponential holding, no waiting, no retrials): the asymptotic
 *   variance of the time-congestion estimator from the birth-death formula
 *   sigma^2 = 2 sum_{j<N} (sum_{i<=j} pi_i (f_i - B))^2 / (lambda pi_j), f = 1{N busy}
 *   (Whitt, Operations Research 40, 1992; applied to blocking by Srikant & Whitt, ACM TOMACS 6,
 *   1996), so n = z^2 v / (r B)^2 calls with v = lambda sigma^2 the variance per call. The control
 *   variates of the result only shorten this (typically 2-4x), so the plan is on the safe side.
 * - Elsewhere a short pilot (PILOT_REPLICATIONS replications) of the scenario measures the
 *   variance per call of the reported estimator; a 10-replication variance is itself uncertain by
 *   about +-45 % (chi-square on 9 degrees of freedom), which the figures inherit.
 */

export interface RunLengthOptions {
  /** Target half-width of the call-congestion interval relative to the estimate (0 < r < 1). */
  relativeHalfWidth: number;
  /** Speed of one core in events per second; default: the reference loop on the project's machine (README, Performance). */
  eventsPerSecond?: number;
  threads?: number;
}

export interface RunLengthPlan {
  /** Measured fresh calls needed in all (warm-up excluded). */
  calls: number;
  /** Per replication, with the scenario's replication count. */
  callsPerReplication: number;
  replications: number;
  /** Wall-clock estimate including warm-up calls. */
  seconds: number;
  /** How the variance was obtained. */
  method: string;
  /** Call congestion the plan is for (exact, or the pilot's estimate). */
  callCongestion: number;
  /** Variance per call of the estimator relative to independent sampling, B (1 - B). */
  varianceRatio: number;
  /** True when the pilot saw no blocking: `calls` is then only a lower bound. */
  lowerBound: boolean;
  /**
   * Why the replications are longer than the precision alone needs (then `calls` is more than
   * the precision needs): the engine's own warnings would otherwise call the run too short.
   */
  lengthened?: string;
}

/** Events per second of one core (reference loop, 10-18 M measured in tests/bench; a round middle value). */
export const DEFAULT_EVENTS_PER_SECOND = 12e6;
export const PILOT_REPLICATIONS = 10;
const PILOT_CALLS = 20_000;
const PILOT_MAX_CALLS_PER_REPLICATION = 200_000;

/** Is this the Erlang model whose asymptotic variance has a closed form? */
export function isErlangModel(scenario: Scenario): boolean {
  return scenario.arrivals.process === "poisson" && scenario.holding.law === "exponential" && scenario.waitingPositions === 0 && !scenario.retrials;
}

/**
 * Asymptotic variance per unit time of the fraction of time all N servers are busy in M/M/N/N
 * (Whitt's birth-death formula, see above), with the stationary law from the Erlang recursion.
 */
export function erlangTimeCongestionVariance(servers: number, arrivalRate: number, meanHolding: number): { blocking: number; variance: number } {
  const a = arrivalRate * meanHolding;
  // pi_j proportional to a^j / j!, normalised in logs to stay finite for large N.
  const logTerms = new Float64Array(servers + 1);
  for (let j = 1; j <= servers; j++) logTerms[j] = logTerms[j - 1] + Math.log(a / j);
  let max = -Infinity;
  for (const v of logTerms) max = Math.max(max, v);
  let total = 0;
  const pi = Array.from(logTerms, (v) => Math.exp(v - max));
  for (const p of pi) total += p;
  for (let j = 0; j <= servers; j++) pi[j] /= total;
  const b = pi[servers];
  let cumulative = 0;
  let sum = 0;
  for (let j = 0; j < servers; j++) {
    cumulative += pi[j];
    if (pi[j] > 0) sum += (b * cumulative) ** 2 / (arrivalRate * pi[j]);
  }
  return { blocking: b, variance: 2 * sum };
}

function quantile(scenario: Scenario): number {
  return tQuantile(0.5 + scenario.run.confidence / 2, Math.max(1, scenario.run.replications - 1));
}

/** Fewest draws n of a law with at most UNSEEN_SHARE_LIMIT of its mean in draws rarer than 1 in n (the heavy-tail warning's rule); Infinity past 1e12. */
function drawsForTail(law: Law): number {
  if (law.law === "pareto" && law.shape <= 2) return 1; // infinite variance: its own warning, no length cures it
  if (unseenMeanShare(law, 2) <= UNSEEN_SHARE_LIMIT) return 2;
  let high = 4;
  while (unseenMeanShare(law, high) > UNSEEN_SHARE_LIMIT) {
    high *= 2;
    if (high > 1e12) return Infinity;
  }
  let low = high / 2; // share(low) > limit >= share(high); the share falls as n grows
  while (high - low > Math.max(1, low * 1e-3)) {
    const mid = Math.floor((low + high) / 2);
    if (unseenMeanShare(law, mid) > UNSEEN_SHARE_LIMIT) low = mid;
    else high = mid;
  }
  return Math.ceil(high);
}

/**
 * The shortest replication, in fresh calls, that the engine's own warnings accept (warnings.ts):
 * at least RELAXATION_TIMES_PER_REPLICATION relaxation times ("run-too-short"), and enough holding
 * and interarrival draws that the unseen share of each law's mean is within the limit
 * ("heavy-tail"; a replication draws about one holding time and one gap per fresh call).
 */
export function minimumCallsPerReplication(scenario: Scenario, measured: { callRate: number; blocking: number }): { calls: number; reason?: string } {
  const tau = relaxationTime(scenario);
  const reasons: Array<{ calls: number; reason: string }> = [];
  // MARGIN: replications vary, and a warm-up takes a little of the measured period; 10 % over the
  // line keeps a planned run clear of the warnings (common practice, no source).
  const MARGIN = 1.1;
  if (Number.isFinite(tau.time) && measured.callRate > 0)
    reasons.push({
      calls: Math.ceil(MARGIN * RELAXATION_TIMES_PER_REPLICATION * tau.time * measured.callRate),
      reason: `${RELAXATION_TIMES_PER_REPLICATION} relaxation times (${Number(tau.time.toPrecision(3))}, set by ${tau.source})`,
    });
  // Holding times are drawn for the calls served, gaps for every fresh call.
  const laws: Array<[string, Law, number]> = [["holding", scenario.holding, Math.max(1e-9, 1 - measured.blocking)]];
  if (scenario.arrivals.process === "renewal") laws.push(["arrivals.interarrival", scenario.arrivals.interarrival, 1]);
  for (const [field, law, drawsPerCall] of laws) {
    const n = drawsForTail(law);
    if (Number.isFinite(n) && n > 2) reasons.push({ calls: Math.ceil((MARGIN * n) / drawsPerCall), reason: `enough ${field} draws that the rare long ones are seen (at most ${100 * UNSEEN_SHARE_LIMIT} % of its mean unseen)` });
  }
  const worst = reasons.reduce((a, b) => (b.calls > a.calls ? b : a), { calls: 1, reason: "" });
  return worst.reason ? worst : { calls: 1 };
}

function finish(scenario: Scenario, options: RunLengthOptions, b: number, variancePerCall: number, method: string, lowerBound: boolean, callRate: number): RunLengthPlan {
  const r = options.relativeHalfWidth;
  if (!(r > 0 && r < 1)) throw new RangeError("relativeHalfWidth: must be > 0 and < 1");
  const z = quantile(scenario);
  const replications = scenario.run.replications;
  const precisionCalls = Math.ceil((z * z * variancePerCall) / (r * b) ** 2);
  // Replications shorter than the engine's own warnings accept would give a biased, warned-about
  // run: plan them at that length (more calls than the precision needs), and say so.
  const floor = minimumCallsPerReplication(scenario, { callRate, blocking: b });
  const lengthen = floor.reason !== undefined && Math.ceil(precisionCalls / replications) < floor.calls;
  const callsPerReplication = lengthen ? floor.calls : Math.ceil(precisionCalls / replications);
  const calls = lengthen ? callsPerReplication * replications : precisionCalls;
  const warmup = scenario.run.warmupCalls ?? (scenario.run.warmupTime ?? 0) * freshCallRate(scenario.arrivals, lawMean(scenario.holding));
  // Each call costs an arrival and, when served, a departure; retries and phase changes add a little.
  const eventsPerCall = 2 - b + (scenario.retrials ? 1 : 0);
  const eventsPerSecond = (options.eventsPerSecond ?? DEFAULT_EVENTS_PER_SECOND) * Math.max(1, options.threads ?? 1);
  const seconds = ((callsPerReplication + warmup) * replications * eventsPerCall) / eventsPerSecond;
  return {
    calls,
    callsPerReplication,
    replications,
    seconds,
    method,
    callCongestion: b,
    varianceRatio: variancePerCall / (b * (1 - b)),
    lowerBound,
    ...(lengthen ? { lengthened: `each replication needs at least ${floor.calls} calls for ${floor.reason}; the precision alone needs ${precisionCalls} in all` } : {}),
  };
}

/** The Erlang model's plan from the closed-form variance; undefined elsewhere (a pilot is needed). */
function erlangPlan(scenario: Scenario, options: RunLengthOptions): RunLengthPlan | undefined {
  if (!(isErlangModel(scenario) && scenario.arrivals.process === "poisson")) return undefined;
  const rate = scenario.arrivals.rate;
  const { blocking, variance } = erlangTimeCongestionVariance(scenario.servers, rate, lawMean(scenario.holding));
  if (!(blocking > 0)) return undefined;
  return finish(scenario, options, blocking, variance * rate, "asymptotic variance of the time-congestion estimator, M/M/N/N birth-death formula (Whitt 1992; Srikant & Whitt 1996)", false, rate);
}

/** About how many calls and seconds a run of this scenario needs for the requested precision. */
export function planRunLength(scenario: Scenario, options: RunLengthOptions): RunLengthPlan {
  return erlangPlan(scenario, options) ?? pilotPlan(scenario, options);
}

/** The pilot: fixed replications of the scenario, long enough for its relaxation time where affordable. */
function pilotScenario(scenario: Scenario): { pilot: Scenario; perReplication: number; wanted: number } {
  const rate = freshCallRate(scenario.arrivals, lawMean(scenario.holding));
  const tau = relaxationTime(scenario).time;
  const wanted = Number.isFinite(tau) ? 100 * tau * rate : PILOT_MAX_CALLS_PER_REPLICATION;
  const perReplication = Math.round(Math.min(PILOT_MAX_CALLS_PER_REPLICATION, Math.max(PILOT_CALLS, wanted)));
  const { precision: _precision, horizon: _horizon, callsPerReplication: _calls, chunkReplications: _chunk, ...run } = scenario.run;
  return { pilot: { ...scenario, run: { ...run, replications: PILOT_REPLICATIONS, callsPerReplication: perReplication } }, perReplication, wanted };
}

function planFromPilot(scenario: Scenario, options: RunLengthOptions, { pilot, perReplication, wanted }: ReturnType<typeof pilotScenario>, stats: ReplicationStats[]): RunLengthPlan {
  const result = buildResult(pilot, aggregateReplications(stats, pilot.servers), []);
  const cc = result.callCongestion;
  // The fresh-call rate the pilot saw (for finite sources it depends on how many are busy).
  const measuredRate = stats.reduce((sum, r) => sum + r.calls, 0) / Math.max(1e-300, stats.reduce((sum, r) => sum + r.time, 0));
  const note = perReplication < wanted ? `; the pilot's replications (${perReplication} calls) are shorter than 100 relaxation times, so treat the figure as rough` : "";
  if (cc.upperBoundOnly || !(cc.estimate > 0) || !(cc.standardError > 0)) {
    // No blocking seen: at best the counting variance B (1 - B) per call at the upper bound.
    const upper = cc.ciHigh;
    return finish(scenario, options, upper, upper * (1 - upper), `pilot of ${PILOT_REPLICATIONS} x ${perReplication} calls saw no blocking; at least this many calls (independent sampling at the upper bound ${Number(upper.toPrecision(3))})${note}`, true, measuredRate);
  }
  const variancePerCall = cc.standardError ** 2 * result.calls;
  return finish(scenario, options, cc.estimate, variancePerCall, `pilot of ${PILOT_REPLICATIONS} x ${perReplication} calls (${cc.method ?? "direct count"})${note}`, false, measuredRate);
}

function pilotPlan(scenario: Scenario, options: RunLengthOptions): RunLengthPlan {
  const setup = pilotScenario(scenario);
  const stats = Array.from({ length: PILOT_REPLICATIONS }, (_, i) => runReplication(setup.pilot, i));
  return planFromPilot(scenario, options, setup, stats);
}

/**
 * planRunLength for a browser page: the same answer, with the pilot run in slices of `sliceEvents`
 * and `pause()` awaited between them (e.g. a zero timeout), so the page stays responsive; `signal`
 * stops it between slices with SimulationCancelledError.
 */
export async function planRunLengthInSlices(
  scenario: Scenario,
  options: RunLengthOptions,
  { pause, signal, sliceEvents = 1 << 15 }: { pause: () => Promise<void>; signal?: AbortSignal; sliceEvents?: number },
): Promise<RunLengthPlan> {
  const plan = erlangPlan(scenario, options);
  if (plan) return plan;
  const setup = pilotScenario(scenario);
  const stats: ReplicationStats[] = [];
  for (let i = 0; i < PILOT_REPLICATIONS; i++) {
    const job = new ReplicationJob(setup.pilot, i);
    for (;;) {
      if (signal?.aborted) throw new SimulationCancelledError();
      if (job.advance(sliceEvents)) break;
      await pause();
    }
    stats.push(job.stats());
  }
  return planFromPilot(scenario, options, setup, stats);
}
