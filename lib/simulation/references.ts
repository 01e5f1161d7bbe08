import { z } from "zod";
import * as tt from "../teletraffic";
import { mmppOf, stationaryOfGenerator } from "./engine";
import { batchMean, lawMean, type BatchSizeLaw, type Law, type Scenario } from "./scenario";

/** An analytic value for (part of) the scenario, from lib/teletraffic. */
export const referenceSchema = z.object({
  method: z.string(),
  assumptions: z.string(),
  /** True when the scenario satisfies every assumption of the method, so the simulation should agree within its CI. */
  exact: z.boolean(),
  callCongestion: z.number().optional(),
  /** Refused attempts / all attempts (retrial models). */
  attemptCongestion: z.number().optional(),
  timeCongestion: z.number().optional(),
  carriedTraffic: z.number().optional(),
  lossProbability: z.number().optional(),
  waitingProbability: z.number().optional(),
  meanWait: z.number().optional(),
  meanWaiting: z.number().optional(),
  /** Set instead of values when the method could not be evaluated for these inputs. */
  unavailable: z.string().optional(),
});
export type Reference = z.infer<typeof referenceSchema>;

/** Overflow traffic moments of the primaries, treated as independent (Riordan's formulas per primary). */
export function overflowStreamMoments(primaries: { traffic: number; servers: number }[]): { mean: number; variance: number } {
  let mean = 0;
  let variance = 0;
  for (const p of primaries) {
    if (p.servers === 0) {
      mean += p.traffic;
      variance += p.traffic; // a direct Poisson stream: peakedness 1
      continue;
    }
    const m = tt.overflowMoments({ traffic: p.traffic, servers: p.servers });
    mean += m.mean;
    variance += m.variance;
  }
  return { mean, variance };
}

/** Solves x A = b for a small dense matrix (Gaussian elimination with partial pivoting). */
function solveRowSystem(a: number[][], b: number[]): number[] {
  const k = b.length;
  // x A = b  <=>  A^T x^T = b^T
  const m = Array.from({ length: k }, (_, i) => [...Array.from({ length: k }, (_, j) => a[j][i]), b[i]]);
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
    [m[c], m[p]] = [m[p], m[c]];
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = m[r][c] / m[c][c];
      for (let j = c; j <= k; j++) m[r][j] -= f * m[c][j];
    }
  }
  return m.map((row, i) => row[k] / row[i]);
}

/**
 * Mean and variance of the busy servers an MMPP would hold on an infinite group with exponential
 * holding (rate mu): with m_j = E[N; J = j] and f_j = E[N(N-1); J = j], the stationary moment
 * equations are m (mu I - Q) = pi Lambda and f (2 mu I - Q) = 2 m Lambda.
 */
export function mmppOfferedMoments(rates: number[], switching: number[][], meanHolding: number): { mean: number; variance: number } {
  const k = rates.length;
  const mu = 1 / meanHolding;
  const pi = stationaryOfGenerator(switching);
  const shifted = (c: number) =>
    Array.from({ length: k }, (_, i) =>
      Array.from({ length: k }, (_, j) => {
        if (i !== j) return -switching[i][j];
        let out = 0;
        for (let l = 0; l < k; l++) if (l !== i) out += switching[i][l];
        return c + out;
      }),
    );
  const m = solveRowSystem(shifted(mu), pi.map((p, i) => p * rates[i]));
  const f = solveRowSystem(shifted(2 * mu), m.map((x, i) => 2 * x * rates[i]));
  const mean = m.reduce((a, b) => a + b, 0);
  return { mean, variance: f.reduce((a, b) => a + b, 0) + mean - mean * mean };
}

/** Batch Poisson on an infinite group with exponential holding: Z = (1 + E[X^2]/E[X]) / 2 (Campbell's theorem). */
export function batchPeakedness(law: BatchSizeLaw): number {
  let m1 = 0;
  let m2 = 0;
  switch (law.law) {
    case "geometric":
      m1 = law.mean;
      m2 = law.mean * (law.mean - 1) + law.mean * law.mean; // var = m (m - 1)
      break;
    case "fixed":
      m1 = law.value;
      m2 = law.value * law.value;
      break;
    case "uniform":
      for (let x = law.min; x <= law.max; x++) {
        m1 += x;
        m2 += x * x;
      }
      m1 /= law.max - law.min + 1;
      m2 /= law.max - law.min + 1;
      break;
    case "empirical":
      law.values.forEach((x, i) => {
        m1 += x * law.probabilities[i];
        m2 += x * x * law.probabilities[i];
      });
      break;
  }
  return (1 + m2 / m1) / 2;
}

/** Mean fresh-call rate offered to the group under study (for overflow: the overflow rate). */
export function meanCallRate(scenario: Scenario): number {
  const a = scenario.arrivals;
  const h = lawMean(scenario.holding);
  switch (a.process) {
    case "poisson":
      return a.rate;
    case "mmpp":
    case "on-off": {
      const m = mmppOf(a)!;
      const pi = stationaryOfGenerator(m.switching);
      return pi.reduce((s, p, i) => s + p * m.rates[i], 0);
    }
    case "renewal":
      return 1 / lawMean(a.interarrival);
    case "batch":
      return a.rate * batchMean(a.batchSize);
    case "overflow":
      return overflowStreamMoments(a.primaries).mean / h;
    case "finite-source": {
      // Engset's offered traffic S beta / (1 + beta): what the sources would offer with no blocking.
      const beta = a.idleRate * h;
      return (a.sources * beta) / (1 + beta) / h;
    }
    case "time-varying": {
      const cycle = a.profile.reduce((s, p) => s + p.duration, 0);
      return a.profile.reduce((s, p) => s + p.duration * p.rate, 0) / cycle;
    }
  }
}

/** Mean offered traffic in erlangs before retrials; for overflow, the primaries' total traffic. */
export function offeredTraffic(scenario: Scenario): number {
  if (scenario.arrivals.process === "overflow") return scenario.arrivals.primaries.reduce((s, p) => s + p.traffic, 0);
  return meanCallRate(scenario) * lawMean(scenario.holding);
}

function attempt(method: string, assumptions: string, exact: boolean, compute: () => Omit<Reference, "method" | "assumptions" | "exact">): Reference {
  try {
    return { method, assumptions, exact, ...compute() };
  } catch (error) {
    return { method, assumptions, exact: false, unavailable: error instanceof Error ? error.message : String(error) };
  }
}

/** Laws the GI/M/N/N solver accepts (a subset of the scenario's laws). */
function renewalLaw(law: Law): tt.InterarrivalLaw | undefined {
  switch (law.law) {
    case "exponential":
      return { law: "exponential", mean: law.mean };
    case "erlang":
      return { law: "erlang", k: law.k, mean: law.mean };
    case "deterministic":
      return { law: "deterministic", value: law.value };
    case "gamma":
      return { law: "gamma", mean: law.mean, cv: law.cv };
    case "hyperexponential":
      return law.probabilities ? { law: "hyperexponential", probabilities: law.probabilities, means: law.means } : { law: "hyperexponential", mean: law.mean, scv: law.scv };
    default:
      return undefined;
  }
}

/**
 * Analytic references for the scenario: Erlang B at the same mean offered traffic always, then
 * the most specific method that applies. `exact` is true only when the scenario meets all of the
 * method's assumptions (warm-up and finite run length aside).
 */
export function referencesFor(scenario: Scenario): Reference[] {
  const n = scenario.servers;
  const a = scenario.arrivals;
  const h = lawMean(scenario.holding);
  const exponentialHolding = scenario.holding.law === "exponential";
  const retrying = scenario.retrials !== undefined && scenario.retrials.persistence > 0;
  const pureLoss = scenario.waitingPositions === 0 && !retrying;
  const lossOnly = scenario.waitingPositions === 0; // the loss-system methods need it
  const traffic = meanCallRate(scenario) * h;
  const out: Reference[] = [];

  out.push(
    attempt(
      "Erlang B",
      "Poisson arrivals at the same mean offered traffic, any holding-time law (insensitivity), blocked calls cleared, no waiting",
      (a.process === "poisson" || (a.process === "renewal" && a.interarrival.law === "exponential")) && pureLoss,
      () => {
        const b = tt.erlangB(n, traffic);
        return { callCongestion: b, timeCongestion: b, carriedTraffic: traffic * (1 - b) };
      },
    ),
  );

  if (a.process === "finite-source" && scenario.waitingPositions === 0) {
    out.push(
      attempt("Engset", "finite sources with exponential idle times, any holding-time law (insensitivity), blocked calls return to idle", !retrying, () => {
        const e = tt.engset({ sources: a.sources, servers: n, idleRate: a.idleRate, meanHolding: h });
        return { callCongestion: e.callCongestion, timeCongestion: e.timeCongestion, carriedTraffic: e.carriedTraffic };
      }),
    );
  }

  if (a.process === "renewal" && lossOnly) {
    const law = renewalLaw(a.interarrival);
    if (law)
      out.push(
        attempt("GI/M/N/N (Palm-Takacs)", "renewal arrivals, exponential holding, blocked calls cleared", exponentialHolding && pureLoss, () => {
          const r = tt.renewalLossSystem({ servers: n, interarrival: law, meanHolding: h });
          return { callCongestion: r.callCongestion, timeCongestion: r.timeCongestion, carriedTraffic: r.carriedTraffic };
        }),
      );
  }

  const mmpp = mmppOf(a);
  if (mmpp && lossOnly) {
    out.push(
      attempt("MMPP/M/N/N exact chain", "Markov-modulated Poisson arrivals, exponential holding, blocked calls cleared", exponentialHolding && pureLoss, () => {
        const m = tt.mmppLossSystem({ servers: n, rates: mmpp.rates, switching: mmpp.switching, meanHolding: h });
        return { callCongestion: m.callCongestion, timeCongestion: m.timeCongestion, carriedTraffic: m.carriedTraffic };
      }),
    );
  }

  // Peaked streams (MMPP, batches): equivalent random and Hayward on the stream's infinite-group moments.
  let peaked: { mean: number; variance: number; what: string } | undefined;
  if (mmpp) peaked = { ...mmppOfferedMoments(mmpp.rates, mmpp.switching, h), what: "MMPP" };
  if (a.process === "batch") peaked = { mean: traffic, variance: traffic * batchPeakedness(a.batchSize), what: "batch Poisson" };
  if (peaked && lossOnly && peaked.variance / peaked.mean > 1 + 1e-9) {
    const { mean, variance, what } = peaked;
    const z = variance / mean;
    out.push(
      attempt("Wilkinson equivalent random", `${what} stream replaced by an overflow stream with the same mean and variance (peakedness ${z.toPrecision(4)} for exponential holding)`, false, () => {
        const er = tt.equivalentRandom({ mean, variance, servers: n });
        return { callCongestion: er.blocking, carriedTraffic: mean - (er.lostTraffic ?? 0) };
      }),
    );
    out.push(
      attempt("Hayward", `peaked stream: B(N/Z, M/Z) with Z = ${z.toPrecision(4)} of the ${what} stream for exponential holding`, false, () => {
        const hw = tt.haywardBlocking({ mean, variance, servers: n });
        return { callCongestion: hw.blocking, carriedTraffic: mean - hw.lostTraffic };
      }),
    );
  }

  if (a.process === "batch" && a.batchSize.law === "geometric" && lossOnly) {
    const batchSize = a.batchSize;
    out.push(
      attempt(
        "batch Poisson exact chain",
        `Poisson batches with geometric sizes, exponential holding, ${a.admission} admission, blocked calls cleared`,
        exponentialHolding && pureLoss,
        () => {
          const b = tt.batchPoissonLossSystem({ servers: n, traffic, meanBatchSize: batchSize.mean, admission: a.admission });
          return { callCongestion: b.callCongestion, timeCongestion: b.timeCongestion, carriedTraffic: b.carriedTraffic };
        },
      ),
    );
  }

  if (a.process === "overflow" && lossOnly) {
    out.push(
      attempt(
        "overflow network exact chain",
        "Poisson traffic to each primary group, overflow offered to the group under study, exponential holding with one mean, blocked calls cleared",
        exponentialHolding && pureLoss,
        () => {
          const o = tt.overflowLossSystem({ primaries: a.primaries, servers: n });
          return { callCongestion: o.blocking, timeCongestion: o.timeCongestion, carriedTraffic: o.overflowOffered - o.overflowLost };
        },
      ),
    );
  }

  if (a.process === "overflow" && lossOnly) {
    const { mean, variance } = overflowStreamMoments(a.primaries);
    const singlePrimary = a.primaries.length === 1;
    out.push(
      attempt(
        "Wilkinson equivalent random",
        "overflow stream replaced by the overflow of one Poisson group with the same mean and variance; exponential holding",
        false,
        () => {
          if (variance / mean < 1 + 1e-12) {
            const b = tt.erlangB(n, mean);
            return { callCongestion: b };
          }
          const er = tt.equivalentRandom({ mean, variance, servers: n });
          // The group under study sees only overflow calls, so its call congestion is the lost share of that traffic.
          return { callCongestion: er.blocking, carriedTraffic: mean - (er.lostTraffic ?? 0) };
        },
      ),
    );
    out.push(
      attempt("Hayward", "peaked stream: B(N/Z, M/Z) with Z = V/M of the overflow stream; exponential holding", false, () => {
        const hw = tt.haywardBlocking({ mean, variance, servers: n });
        return { callCongestion: hw.blocking, carriedTraffic: mean - hw.lostTraffic };
      }),
    );
    if (singlePrimary) out[out.length - 2].assumptions += "; with one primary group it reproduces that group's moments exactly";
  }

  if (retrying && scenario.waitingPositions === 0) {
    const r = scenario.retrials!;
    out.push(
      attempt(
        "extended Erlang B",
        "Poisson fresh calls; a refused attempt returns with probability = persistence, long after, as Poisson traffic; no attempt limit",
        false,
        () => {
          const e = tt.extendedErlangB({ servers: n, traffic, recallFactor: r.persistence });
          // With all attempts Poisson (its assumption) fresh calls and retries see the same blocking.
          return { callCongestion: e.blocking, attemptCongestion: e.blocking, lossProbability: e.probabilityFreshCallLost, carriedTraffic: e.carriedTraffic };
        },
      ),
    );
  }

  if (scenario.waitingPositions > 0) {
    const q = scenario.waitingPositions;
    out.push(
      attempt(
        "M/M/N/N+Q",
        "Poisson arrivals, exponential holding, FIFO waiting with Q positions, no abandonment, no retrials",
        a.process === "poisson" && exponentialHolding && !scenario.patience && !retrying,
        () => {
          const f = tt.finiteQueue({ servers: n, traffic, queuePositions: q, meanHolding: h });
          return {
            callCongestion: f.timeCongestion, // refused share of arrivals = P(system full) by PASTA
            timeCongestion: f.probabilityAllServersBusy,
            carriedTraffic: f.carriedTraffic,
            lossProbability: f.timeCongestion,
            waitingProbability: f.probabilityOfWaiting / (1 - f.timeCongestion),
            meanWait: f.meanWait,
            meanWaiting: f.meanQueueLength,
          };
        },
      ),
    );
  }
  return out;
}
