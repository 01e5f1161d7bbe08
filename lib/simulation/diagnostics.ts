import gammainc from "@stdlib/math-base-special-gammainc";
import erfc from "@stdlib/math-base-special-erfc";
import normalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import { balancedHyperexponential, LawSampler, weibullShapeForCv } from "./laws";
import { lawMean, type Law, type Scenario } from "./scenario";
import { lawVariance } from "./variance-reduction";

/**
 * Time scales and tail measures behind the warnings (warnings.ts) and the run-length planner
 * (run-length.ts). Pure functions of the scenario.
 */

/**
 * Share of a law's mean carried by draws rarer than 1 in n: integral over u in (1 - 1/n, 1) of
 * the quantile function Q(u), divided by the mean. A replication drawing n values typically sees
 * none of them, so its mean draw falls short by about this share; for light tails it is about
 * ln(n)/n (exponential: (1 + ln n)/n), for Pareto shape a it is n^(1/a - 1), which is why heavy
 * tails give intervals that are confidently wrong (every replication misses the same part).
 */
export function unseenMeanShare(law: Law, n: number): number {
  if (!(n > 1)) return 1;
  const p = 1 / n;
  const mean = new LawSampler(law).mean;
  switch (law.law) {
    case "exponential":
      return (1 + Math.log(n)) / n;
    case "deterministic":
      return p;
    case "uniform": {
      const x = law.max - (law.max - law.min) * p; // the 1 - 1/n quantile
      return (p * (x + law.max)) / 2 / mean;
    }
    case "pareto":
      return Math.pow(n, 1 / law.shape - 1);
    case "lognormal": {
      const sigma = Math.sqrt(Math.log(1 + law.cv * law.cv));
      const z = normalQuantile(1 - p, 0, 1);
      return 0.5 * erfc((z - sigma) / Math.SQRT2);
    }
    case "erlang":
    case "gamma": {
      const k = law.law === "erlang" ? law.k : 1 / (law.cv * law.cv);
      // x with P(G_k > x) = 1/n (unit scale), then the share is P(G_{k+1} > x).
      const x = bisect((v) => gammainc(v, k, true, true) - p, 0, Math.max(10, 10 * k + 50 * Math.sqrt(k) + 10 * Math.log(n)));
      return gammainc(x, k + 1, true, true);
    }
    case "weibull": {
      const shape = law.shape ?? weibullShapeForCv(law.cv!);
      return gammainc(Math.log(n), 1 + 1 / shape, true, true);
    }
    case "hyperexponential": {
      const b = law.probabilities && law.means ? { probabilities: law.probabilities, means: law.means } : balancedHyperexponential(law.mean!, law.scv!);
      const survival = (x: number) => b.probabilities.reduce((s, q, i) => s + q * Math.exp(-x / b.means[i]), 0);
      const x = bisect((v) => survival(v) - p, 0, Math.max(...b.means) * (Math.log(n) + 50));
      return b.probabilities.reduce((s, q, i) => s + q * (x + b.means[i]) * Math.exp(-x / b.means[i]), 0) / mean;
    }
    case "empirical": {
      const sorted = [...law.samples].sort((a, c) => c - a);
      const weight = 1 / sorted.length;
      let mass = 0;
      let share = 0;
      for (const v of sorted) {
        const take = Math.min(weight, p - mass);
        if (take <= 0) break;
        share += take * v;
        mass += take;
      }
      return share / mean;
    }
  }
}

/** Root of a decreasing function on [lo, hi] by bisection. */
function bisect(f: (x: number) => number, lo: number, hi: number): number {
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Unseen share above which a law's draws per replication are too few (1 % of the mean; common practice, no source). */
export const UNSEEN_SHARE_LIMIT = 0.01;

export interface RelaxationTime {
  /** The longest time scale, in the scenario's time unit (Infinity when a variance is infinite). */
  time: number;
  /** What sets it. */
  source: string;
}

/**
 * Relaxation time of the state the estimates average over. The busy-server process of the Erlang
 * model relaxes like that of the M/G/infinity group: its autocovariance integrates to
 * E[H^2] / (2 E[H]) = h (1 + c^2) / 2 (Takacs; h for exponential holding, where the
 * autocorrelation is exp(-t/h) and the finite M/M/N/N group relaxes at least as fast). The arrival
 * process and retrials add their own: an MMPP its longest mean phase sojourn (exact for two
 * phases: 1 / (q12 + q21)), a time-varying profile its cycle, finite sources their mean idle
 * time, retrials the mean time a call spends retrying, delay / (1 - persistence).
 */
export function relaxationTime(scenario: Scenario): RelaxationTime {
  const h = lawMean(scenario.holding);
  const v = lawVariance(scenario.holding);
  const candidates: RelaxationTime[] = [{ time: (h + v / h) / 2, source: "holding times (E[H^2] / 2E[H])" }];
  const a = scenario.arrivals;
  if (a.process === "on-off") candidates.push({ time: 1 / (1 / a.meanOn + 1 / a.meanOff), source: "on-off phases" });
  if (a.process === "mmpp" && a.rates.length > 1) {
    if (a.rates.length === 2) candidates.push({ time: 1 / (a.switching[0][1] + a.switching[1][0]), source: "MMPP phases" });
    else candidates.push({ time: Math.max(...a.switching.map((row, i) => 1 / row.reduce((s, q, j) => s + (j === i ? 0 : q), 0))), source: "MMPP phases" });
  }
  if (a.process === "time-varying") candidates.push({ time: a.profile.reduce((s, p) => s + p.duration, 0), source: "the profile's cycle" });
  if (a.process === "finite-source") candidates.push({ time: 1 / a.idleRate, source: "idle time of a source" });
  if (a.process === "renewal") {
    const m = lawMean(a.interarrival);
    candidates.push({ time: (m + lawVariance(a.interarrival) / m) / 2, source: "interarrival times" });
  }
  const r = scenario.retrials;
  if (r && r.persistence > 0) {
    const attempts = r.maxAttempts ?? Infinity;
    const retries = r.persistence >= 1 ? attempts - 1 : Math.min(attempts - 1, 1 / (1 - r.persistence));
    candidates.push({ time: lawMean(r.delay) * retries, source: "retrying (delay / (1 - persistence))" });
  }
  return candidates.reduce((best, c) => (c.time > best.time || Number.isNaN(c.time) ? c : best));
}

/**
 * A replication's measured period should span this many relaxation times: its start then
 * biases the average by at most 1 % of the initial displacement (exp-decay bias ~ tau / T), and
 * the period holds about 50 independent stretches of 2 tau, enough for the replication means to
 * be close to normal (common practice, no source).
 */
export const RELAXATION_TIMES_PER_REPLICATION = 100;
