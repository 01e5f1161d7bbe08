import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { hyperexponentialBranches, lawMean, type Law } from "./laws";
import type { MmppQueueResult } from "./mmpp";
import { lnGamma } from "./numeric";
import { gthStationary } from "./qbd";
import { interarrivalLawSchema } from "./renewal";
import { logIntegralUnimodal, smoothSubstitution } from "./transform";
import { departureRate } from "./departures";

/**
 * GI/M/N/N+Q with renewal arrivals, exponential holding (rate μ) and optional exponential patience
 * (rate α), by the embedded Markov chain at arrival instants (Takács 1962; Gross & Harris,
 * "Fundamentals of Queueing Theory", the GI/M/c/K model). An arrival that sees i calls leaves
 * i' = min(i + 1, K) (K = N + Q; an arrival seeing K is refused); until the next arrival the calls
 * only leave, a pure death process with rates d(k) = min(k, N) μ + (k − N)⁺ α.
 *
 * Uniformised at Λ = d(K) with the bidiagonal stochastic matrix P, the law after a time t is
 * Σ_n e^{−Λt}(Λt)^n/n! P^n, so the embedded transition matrix is R = Σ_n a_n P^n with the mixed
 * Poisson probabilities a_n = ∫ e^{−Λt}(Λt)^n/n! dA(t) of the interarrival law A. Every term is
 * nonnegative (no alternating sums, unlike the classical binomial formulas). The series is cut at
 * the first M where the left-out mass, times the chance of not having emptied from K by step M,
 * is below 1e-14; the rest is lumped onto P^M (error below that product). The stationary vector π
 * of the embedded chain is found by GTH.
 *
 * Measures: call congestion π_K; waiting probability Σ_{N<=j<K} π_j / (1 − π_K). Time-average law
 * from level crossing in continuous time (up-crossings k−1 → k occur only at arrivals):
 * p_k = λ π_{k−1} / d(k) for k >= 1 (λ = 1/mean interarrival), p_0 = 1 − Σ p_k. Mean wait, mean
 * queue and abandonment follow by Little's law over admitted calls.
 *
 * Mixed Poisson probabilities: closed forms for exponential (geometric), Erlang/gamma (negative
 * binomial), hyperexponential (mixture of geometrics), deterministic (Poisson), empirical (mean of
 * Poisson laws); uniform from Poisson distribution functions at the two ends; lognormal, Weibull
 * and Pareto by the trapezoid rule after the same smoothing substitution as the transforms
 * (transform.ts), relative accuracy about 1e-12.
 */

/** Work (states² × series terms) answered interactively, about 100 ms. */
export const INTERACTIVE_RENEWAL_QUEUE_WORK = 20_000_000;
export const MAX_RENEWAL_QUEUE_WORK = 2_000_000_000;
/** Longest series (terms) before the evaluation is refused. */
const MAX_TERMS = 200_000;
const SERIES_CUT = 1e-14;

export const renewalQueueInputSchema = z
  .object({
    servers: z.number().int().min(1).max(2_000).describe("integer number of servers N (1..2000)"),
    waitingPositions: z.number().int().min(0).max(2_000).default(0).describe("waiting positions Q (FIFO), default 0"),
    interarrival: interarrivalLawSchema.describe("interarrival-time law of the renewal arrival stream (any law of the scenario file)"),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean of the exponential holding time, default 1"),
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a waiting call; default: waits for ever"),
  })
  .superRefine((v, ctx) => {
    if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
    const work = renewalQueueWork(v.servers, v.waitingPositions, v.interarrival, v.meanHolding, v.meanPatience);
    if (work > MAX_RENEWAL_QUEUE_WORK) ctx.addIssue({ code: "custom", path: ["servers"], message: `estimated work ${Number(work.toPrecision(3))} exceeds ${MAX_RENEWAL_QUEUE_WORK}` });
  })
  .describe(`GI/M/N/N+Q: renewal arrivals, exponential holding, Q waiting positions, optional exponential patience (embedded chain at arrivals). ${WAITING_MEASURES}`);
export type RenewalQueueInput = z.input<typeof renewalQueueInputSchema>;

/** The measures of the MMPP queue (the same system with another arrival stream), and the series' size. */
export interface RenewalQueueResult extends MmppQueueResult {
  /** terms of the mixed Poisson series and a bound on the row error of the embedded matrix from cutting it */
  terms: number;
  seriesError: number;
}

const logPoisson = (n: number, x: number) => (x === 0 ? (n === 0 ? 0 : -Infinity) : n * Math.log(x) - x - lnGamma(n + 1));

/**
 * a_n = ∫ e^{−Λt}(Λt)^n/n! dA(t) for n = 0, 1, ... as a lazy sequence (each law its own way).
 * Returns a function giving a_n for increasing n.
 */
export function mixedPoisson(law: Law, big: number): (n: number) => number {
  switch (law.law) {
    case "exponential":
      return geometricMix([1], [law.mean], big);
    case "hyperexponential": {
      const b = hyperexponentialBranches(law);
      return geometricMix(b.probabilities, b.means, big);
    }
    case "erlang":
    case "gamma": {
      const shape = law.law === "erlang" ? law.k : 1 / (law.cv * law.cv);
      if (!(shape < 1e8)) return (n) => Math.exp(logPoisson(n, big * law.mean));
      // Negative binomial: a_n = Γ(n+k)/(Γ(k) n!) (1/(1+θ))^k (θ/(1+θ))^n, θ = Λ mean / k.
      const theta = (big * law.mean) / shape;
      const logQ = Math.log(theta) - Math.log1p(theta);
      const base = -shape * Math.log1p(theta) - lnGamma(shape);
      return (n) => Math.exp(base + lnGamma(n + shape) - lnGamma(n + 1) + n * logQ);
    }
    case "deterministic":
      return (n) => Math.exp(logPoisson(n, big * law.value));
    case "empirical": {
      const xs = law.samples.map((x) => big * x);
      return (n) => xs.reduce((s, x) => s + Math.exp(logPoisson(n, x)), 0) / xs.length;
    }
    case "uniform": {
      // (1/(Λ(b−a))) ∫_{Λa}^{Λb} e^{−x} x^n/n! dx = [F_n(Λa) − F_n(Λb)] / (Λ(b − a)), F_n the Poisson distribution function.
      const lo = big * law.min;
      const hi = big * law.max;
      let fLo = 0;
      let fHi = 0;
      let next = 0;
      return (n) => {
        for (; next <= n; next++) {
          fLo += Math.exp(logPoisson(next, lo));
          fHi += Math.exp(logPoisson(next, hi));
        }
        return hi === lo ? Math.exp(logPoisson(n, lo)) : Math.max(0, Math.min(1, fLo) - Math.min(1, fHi)) / (hi - lo);
      };
    }
    case "lognormal":
    case "weibull":
    case "pareto": {
      const u = smoothSubstitution(law);
      return (n) => Math.exp(logIntegralUnimodal((t) => u.logDensity(t) + logPoisson(n, big * u.value(t)), 0, 1));
    }
  }
}

function geometricMix(probabilities: number[], means: number[], big: number): (n: number) => number {
  const logs = means.map((m) => ({ head: -Math.log1p(big * m), ratio: Math.log(big * m) - Math.log1p(big * m) }));
  return (n) => logs.reduce((s, l, i) => s + probabilities[i] * Math.exp(l.head + n * l.ratio), 0);
}

/**
 * Series terms to expect: for laws with bounded support (or exponential tails no heavier than the
 * exponential's) about Λ × largest interarrival plus spread; otherwise the emptying time of the
 * uniformised chain from K, which caps the series for any law (conservative).
 */
function termsEstimate(servers: number, capacity: number, law: Law, meanHolding: number, meanPatience?: number): number {
  const mu = 1 / meanHolding;
  const alpha = meanPatience ? 1 / meanPatience : 0;
  const big = servers * mu + (capacity - servers) * alpha;
  const slowest = alpha > 0 ? Math.min(mu, alpha) : mu;
  const emptying = (big / slowest) * (Math.log(capacity + 1) + 35);
  const reach =
    law.law === "deterministic" ? law.value : law.law === "uniform" ? law.max : law.law === "empirical" ? Math.max(...law.samples) : law.law === "exponential" || law.law === "erlang" ? 5 * law.mean : undefined;
  const spread = reach === undefined ? Infinity : big * reach + 12 * Math.sqrt(big * reach + 1) + 50;
  return Math.min(MAX_TERMS, emptying, spread);
}

export function renewalQueueWork(servers: number, waitingPositions: number, law: Law, meanHolding: number, meanPatience?: number): number {
  const k = servers + waitingPositions;
  const perTerm = law.law === "lognormal" || law.law === "weibull" || law.law === "pareto" ? 400 : law.law === "empirical" ? law.samples.length : 1;
  const terms = termsEstimate(servers, k, law, meanHolding, meanPatience);
  return (k + 1) * (k + 1) * terms + terms * perTerm + (k + 1) ** 3;
}

export function renewalQueueSystem(input: RenewalQueueInput): RenewalQueueResult {
  const v = parseInput(renewalQueueInputSchema, input);
  const n = v.servers;
  const kMax = n + v.waitingPositions;
  const mu = 1 / v.meanHolding;
  const alpha = v.meanPatience !== undefined ? 1 / v.meanPatience : 0;
  const death = (k: number) => departureRate(k, n, mu, alpha);
  const big = death(kMax);
  const meanInterarrival = lawMean(v.interarrival);
  const lambda = 1 / meanInterarrival;
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw inputError("interarrival", "needs a positive finite mean");
  const a = mixedPoisson(v.interarrival, big);
  const width = kMax + 1;
  // rows[i * width + j] = (P^t)_{ij} for the current t; R accumulates Σ a_t P^t.
  let rows = new Float64Array(width * width);
  let next = new Float64Array(width * width);
  for (let i = 0; i < width; i++) rows[i * width + i] = 1;
  const r = new Float64Array(width * width);
  let used = 0;
  let terms = 0;
  let seriesError = 0;
  for (let t = 0; ; t++) {
    const at = a(t);
    used += at;
    for (let i = 0; i < width * width; i++) r[i] += at * rows[i];
    // Left-out mass times the chance of not having emptied from K by step t bounds the lumping error.
    const left = Math.max(0, 1 - used);
    const notEmptied = 1 - rows[kMax * width];
    terms = t + 1;
    if (left * 2 * notEmptied <= SERIES_CUT || left === 0) {
      seriesError = left * 2 * notEmptied;
      for (let i = 0; i < width * width; i++) r[i] += left * rows[i];
      break;
    }
    if (terms >= MAX_TERMS) throw inputError("interarrival", `the series needs more than ${MAX_TERMS} terms (interarrival law with a very long tail against this group)`);
    // One step of the uniformised pure death chain: k → k−1 with d(k)/Λ, stay with (Λ − d(k))/Λ.
    next.fill(0);
    for (let i = 0; i < width; i++) {
      const base = i * width;
      for (let j = 0; j <= i; j++) {
        const x = rows[base + j];
        if (x === 0) continue;
        const down = death(j) / big;
        next[base + j] += x * (1 - down);
        if (j > 0) next[base + j - 1] += x * down;
      }
    }
    const swap = rows;
    rows = next;
    next = swap;
  }
  // Embedded chain: from i (seen) to j (seen next) with probability R[min(i+1, K)][j].
  const rates = new Float64Array(width * width);
  for (let i = 0; i < width; i++) {
    const from = Math.min(i + 1, kMax);
    for (let j = 0; j < width; j++) if (j !== i) rates[i * width + j] = r[from * width + j];
  }
  const pi = gthStationary(rates, width);
  if (!pi) throw new Error("renewal queue: embedded chain is reducible");
  const callCongestion = pi[kMax];
  let waitingArrivals = 0;
  for (let j = n; j < kMax; j++) waitingArrivals += pi[j];
  // Time-average law by level crossing: p_k = λ π_{k−1} / d(k).
  let allBusy = 0;
  let busy = 0;
  let queue = 0;
  for (let k = 1; k <= kMax; k++) {
    const p = (lambda * pi[k - 1]) / death(k);
    if (k >= n) allBusy += p;
    busy += Math.min(k, n) * p;
    queue += Math.max(0, k - n) * p;
  }
  const admittedRate = lambda * (1 - callCongestion);
  const abandonRate = alpha * queue;
  return assertFiniteResult(
    {
      method: `GI/M/N/N+Q embedded chain at arrivals (mixed Poisson series of ${terms} terms, GTH)`,
      servers: n,
      waitingPositions: v.waitingPositions,
      offeredTraffic: lambda * v.meanHolding,
      callCongestion,
      timeCongestion: allBusy,
      carriedTraffic: busy,
      waitingProbability: waitingArrivals / (1 - callCongestion),
      meanWait: queue / admittedRate,
      meanQueueLength: queue,
      abandonmentProbability: abandonRate / admittedRate,
      lossProbability: Math.min(1, callCongestion + abandonRate / lambda),
      terms,
      seriesError,
    },
    "renewalQueueSystem",
  );
}
