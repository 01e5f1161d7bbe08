import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput, TeletrafficConvergenceError } from "./errors";
import { lawMean, type Law } from "./laws";
import { gthStationary } from "./qbd";
import { interarrivalLawSchema } from "./renewal";
import { mixedPoisson } from "./renewal-queue";
import { extrapolatedTail, levelMass, retrialRateMeasures, TRUNCATION_BOUND, type RetrialRateMeasures } from "./retrial-chain";
import { departureRate } from "./departures";

/**
 * Retrials on renewal arrivals (GI/M/N/N+Q with an orbit), by the embedded Markov chain at arrival
 * instants on (calls in the system k, calls in orbit o), the orbit capped at M. Between arrivals
 * the state moves as a continuous-time chain (departures d(k) = min(k, N) μ + (k − N)⁺ α, retries
 * at rate o θ, a refused retry returning to the orbit with the persistence p); uniformised at its
 * largest exit rate Λ with stochastic matrix P, the law one interarrival time later is
 * R = Σ_n a_n P^n with the interarrival law's mixed Poisson probabilities a_n (renewal-queue.ts),
 * all terms nonnegative. An arrival moves (k, o) to (k + 1, o) if k < N + Q, else to (k, o + 1)
 * with probability p (lost at the cap). π, the law seen by arrivals, is the stationary vector of
 * that embedded chain (GTH). The time-average law follows from π by the cumulative form of the
 * same series: p = λ π_after Σ_n P(N_T > n)/Λ P^n (N_T: uniformisation events in an interarrival
 * time T), from which retry, orbit and waiting measures come.
 *
 * The series is cut where 2 × its left-out mass (a bound on the error of each row of R) is below
 * 1e-13, or earlier where the left-out mass times the largest mass not yet in the empty state (which
 * absorbs between arrivals) is: the rest is then placed on the empty state (long-tailed laws); the orbit cap doubles until the estimated mass beyond it (from the time-average law, as
 * in retrial-chain.ts) is below TRUNCATION_BOUND. Dense in the truncated state space, so small
 * groups only.
 */

/** About 100 ms (about 5 ns per unit). */
export const INTERACTIVE_RENEWAL_RETRIAL_WORK = 20_000_000;
export const MAX_RENEWAL_RETRIAL_WORK = 3_000_000_000;
const MAX_TERMS = 20_000;
const SERIES_CUT = 1e-13;
const FIRST_CAP = 16;
const MAX_STATES = 3_000;

export const renewalRetrialInputSchema = z
  .object({
    servers: z.number().int().min(1).max(200).describe("integer number of servers N (1..200)"),
    waitingPositions: z.number().int().min(0).max(200).default(0).describe("waiting positions Q (FIFO), default 0"),
    interarrival: interarrivalLawSchema.describe("interarrival-time law of the fresh calls (any law of the scenario file)"),
    persistence: z.number().min(0).max(1).describe("probability that a refused call tries again (after every refusal), 0..1"),
    meanRetryDelay: z.number().gt(0).max(1e12).describe("mean exponential delay before a repeated attempt"),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1"),
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a waiting call; default: waits for ever"),
  })
  .superRefine((v, ctx) => {
    if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
  })
  .describe(`retrials on renewal arrivals: exact embedded chain at arrivals on (calls, orbit), orbit truncated with a stated bound. ${WAITING_MEASURES}`);
export type RenewalRetrialInput = z.input<typeof renewalRetrialInputSchema>;

export interface RenewalRetrialResult extends RetrialRateMeasures {
  method: string;
  servers: number;
  waitingPositions: number;
  persistence: number;
  offeredTraffic: number;
  timeCongestion: number;
  orbitCap: number;
  states: number;
  /** estimated mass beyond the orbit cap plus the series cut's row error */
  neglectedMass: number;
  terms: number;
}

interface Model {
  n: number;
  kMax: number;
  mu: number;
  alpha: number;
  p: number;
  theta: number;
  law: Law;
  lambda: number;
}

/** Interarrival times (in means) beyond which the law leaves less than about 1e-13, or undefined for long tails. */
function reachInMeans(law: Law): number | undefined {
  switch (law.law) {
    case "deterministic":
      return 1;
    case "uniform":
      return law.max / ((law.min + law.max) / 2);
    case "empirical":
      return Math.max(...law.samples) / lawMean(law);
    case "exponential":
      return 31;
    case "erlang":
      return 31;
    default:
      return undefined;
  }
}

/**
 * Work of a solve through the first two orbit caps: dense powers (3 S² per series term) and the
 * GTH solve (S³).
 */
export function renewalRetrialWork(servers: number, waitingPositions: number, law: Law, meanHolding: number, persistence: number, meanRetryDelay: number): number {
  let work = 0;
  for (const cap of persistence > 0 ? [FIRST_CAP, 2 * FIRST_CAP] : [0]) {
    const states = (cap + 1) * (servers + waitingPositions + 1);
    const big = (servers + waitingPositions) / meanHolding + (persistence > 0 ? cap / meanRetryDelay : 0);
    const reach = reachInMeans(law);
    // Long-tailed laws end where the group has emptied between arrivals: about 30 × Λ × (holding time
    // + retry delay) terms (measured: Pareto 945 and Weibull cv 3 3 362 terms against 3 100 and 6 000 here).
    const emptied = 30 * big * (meanHolding + (persistence > 0 ? meanRetryDelay : 0)) + 50;
    const terms = Math.min(MAX_TERMS, reach === undefined ? emptied : Math.min(emptied, big * lawMean(law) * reach + 12 * Math.sqrt(big * lawMean(law) * reach + 1) + 50));
    work += 3 * states * states * terms + states ** 3;
  }
  return work;
}

function solveCapped(m: Model, cap: number) {
  const width = m.kMax + 1;
  const states = (cap + 1) * width;
  const death = (k: number) => departureRate(k, m.n, m.mu, m.alpha);
  // Sparse P: at most three moves per state (departure, retry admitted or lost) plus staying.
  const big = death(m.kMax) + cap * m.theta + 1e-300;
  const down = new Float64Array(states); // (k, o) → (k − 1, o)
  const retry = new Float64Array(states); // (k, o) → (k + 1, o − 1) or, at K, (K, o − 1)
  const stay = new Float64Array(states);
  for (let o = 0; o <= cap; o++)
    for (let k = 0; k <= m.kMax; k++) {
      const s = o * width + k;
      down[s] = death(k) / big;
      retry[s] = (o * m.theta * (k < m.kMax ? 1 : 1 - m.p)) / big;
      stay[s] = Math.max(0, 1 - down[s] - retry[s]);
    }
  const step = (from: Float64Array, to: Float64Array) => {
    to.fill(0);
    for (let s = 0; s < states; s++) {
      const x = from[s];
      if (x === 0) continue;
      const k = s % width;
      to[s] += x * stay[s];
      if (down[s] > 0) to[s - 1] += x * down[s];
      if (retry[s] > 0) to[k < m.kMax ? s - width + 1 : s - width] += x * retry[s];
    }
  };
  // Between arrivals nothing arrives, so the empty state (0, 0) (index 0) absorbs: every row of P^n
  // moves its mass there as n grows, monotonely. Once the weight left, times the largest mass not
  // yet absorbed, is below the cut, the rest of the series is that weight placed on state 0 (error
  // at most their product per row). This ends the series for long-tailed interarrival laws, whose
  // weights a_n fall slowly but whose long gaps the group spends empty.
  const a = mixedPoisson(m.law, big);
  const weights: number[] = [];
  let used = 0;
  const r = new Float64Array(states * states);
  let rows = new Float64Array(states * states);
  let next = new Float64Array(states * states);
  for (let s = 0; s < states; s++) rows[s * states + s] = 1;
  let seriesError = 0;
  for (let t = 0; ; t++) {
    if (t >= MAX_TERMS) throw inputError("interarrival", `the series needs more than ${MAX_TERMS} terms (the group takes too long to empty between arrivals against this interarrival law)`);
    const at = a(t);
    weights.push(at);
    used += at;
    for (let i = 0; i < r.length; i++) r[i] += at * rows[i];
    const left = Math.max(0, 1 - used);
    let unabsorbed = 0;
    for (let s = 0; s < states; s++) unabsorbed = Math.max(unabsorbed, 1 - rows[s * states]);
    if (2 * left <= SERIES_CUT || left * unabsorbed <= SERIES_CUT / 2) {
      for (let s = 0; s < states; s++) r[s * states] += left;
      seriesError = Math.min(2 * left, left * unabsorbed);
      break;
    }
    for (let s = 0; s < states; s++) step(rows.subarray(s * states, (s + 1) * states), next.subarray(s * states, (s + 1) * states));
    const swap = rows;
    rows = next;
    next = swap;
  }
  const terms = weights.length;
  // Arrival map: seen (k, o) → after.
  const after = (s: number, visit: (to: number, prob: number) => void) => {
    const k = s % width;
    const o = Math.floor(s / width);
    if (k < m.kMax) visit(s + 1, 1);
    else {
      if (m.p > 0 && o < cap) visit(s + width, m.p);
      else if (m.p > 0) visit(s, m.p); // lost at the cap
      if (m.p < 1) visit(s, 1 - m.p);
    }
  };
  const rates = new Float64Array(states * states);
  for (let s = 0; s < states; s++)
    after(s, (to, prob) => {
      for (let j = 0; j < states; j++) if (j !== s) rates[s * states + j] += prob * r[to * states + j];
    });
  const pi = gthStationary(rates, states);
  if (!pi) throw new Error("renewal retrial: embedded chain is reducible");
  // Time-average law: λ π_after Σ_n P(N_T > n)/Λ P^n, the vector advanced term by term, and ended
  // as above: the rest of Σ_n P(N_T > n) = E[N_T] = Λ E[T] is spent in the empty state.
  let v = new Float64Array(states);
  for (let s = 0; s < states; s++) after(s, (to, prob) => (v[to] += pi[s] * prob));
  const time = new Float64Array(states);
  let w = new Float64Array(states);
  let cumulative = 0;
  let spent = 0; // Σ_{n <= t} P(N_T > n)
  const expectedEvents = big * lawMean(m.law);
  for (let t = 0; ; t++) {
    cumulative += t < weights.length ? weights[t] : a(t);
    const tail = Math.max(0, 1 - cumulative);
    spent += tail;
    for (let s = 0; s < states; s++) time[s] += (m.lambda * tail * v[s]) / big;
    const rest = Math.max(0, expectedEvents - spent);
    if (tail === 0 || rest * (1 - v[0]) <= SERIES_CUT * expectedEvents) {
      time[0] += (m.lambda * rest) / big;
      break;
    }
    if (t >= 4 * MAX_TERMS) throw new TeletrafficConvergenceError(`renewal retrial: the time-average series did not settle within ${4 * MAX_TERMS} terms`, t);
    step(v, w);
    const swap = v;
    v = w;
    w = swap;
  }
  // Normalise away the series cut (its mass is within seriesError).
  let total = 0;
  for (let s = 0; s < states; s++) total += time[s];
  for (let s = 0; s < states; s++) time[s] /= total;
  return { pi, time, states, terms, seriesError, width };
}

export function renewalRetrialSystem(input: RenewalRetrialInput): RenewalRetrialResult {
  const v = parseInput(renewalRetrialInputSchema, input);
  const meanInterarrival = lawMean(v.interarrival);
  const model: Model = {
    n: v.servers,
    kMax: v.servers + v.waitingPositions,
    mu: 1 / v.meanHolding,
    alpha: v.meanPatience !== undefined ? 1 / v.meanPatience : 0,
    p: v.persistence,
    theta: 1 / v.meanRetryDelay,
    law: v.interarrival,
    lambda: 1 / meanInterarrival,
  };
  const traffic = v.meanHolding / meanInterarrival;
  if (v.persistence === 1 && v.meanPatience === undefined && traffic >= v.servers)
    throw inputError("persistence", `with persistence 1 the orbit is stable only for offered traffic below the number of servers (${v.servers})`);
  const width = model.kMax + 1;
  for (let cap = v.persistence > 0 ? FIRST_CAP : 0; ; cap *= 2) {
    if ((cap + 1) * width > MAX_STATES)
      throw new TeletrafficConvergenceError(`the orbit does not settle within ${MAX_STATES} states (orbit cap ${cap}; persistence near 1 with the load near capacity, or a very long retry delay)`, 0);
    const sol = solveCapped(model, cap);
    let neglected = 0;
    if (cap > 0) {
      neglected = extrapolatedTail((o) => levelMass(sol.time, o, width), cap);
      if (neglected > TRUNCATION_BOUND) continue;
    }
    return assertFiniteResult(measures(model, sol, cap, neglected + sol.seriesError, v), "renewalRetrialSystem");
  }
}

function measures(
  m: Model,
  sol: ReturnType<typeof solveCapped>,
  cap: number,
  neglected: number,
  v: { servers: number; waitingPositions: number; persistence: number; meanHolding: number },
): RenewalRetrialResult {
  const { pi, time, width } = sol;
  const theta = m.p > 0 ? m.theta : 0;
  let freshRefused = 0;
  let lostAtCap = 0;
  let retryRate = 0;
  let retryRefused = 0;
  let retryToWait = 0;
  let freshToWait = 0;
  let allBusy = 0;
  let busy = 0;
  let queue = 0;
  let orbit = 0;
  for (let o = 0; o <= cap; o++)
    for (let k = 0; k <= m.kMax; k++) {
      const s = o * width + k;
      const x = time[s];
      const retries = o * theta * x;
      retryRate += retries;
      if (k === m.kMax) retryRefused += retries;
      else if (k >= m.n) retryToWait += retries;
      if (k >= m.n) allBusy += x;
      busy += Math.min(k, m.n) * x;
      queue += Math.max(0, k - m.n) * x;
      orbit += o * x;
      // Arrival-seen law π: refusals and waits of fresh calls.
      if (k === m.kMax) {
        freshRefused += pi[s];
        if (o === cap) lostAtCap += m.p * pi[s];
      } else if (k >= m.n) freshToWait += pi[s];
    }
  const lambda = m.lambda;
  const abandonRate = m.alpha * queue;
  return {
    method: `retrials on renewal arrivals (${m.law.law} law), embedded chain at arrivals on (calls, orbit), ${sol.states} states, ${sol.terms} series terms${cap > 0 ? `; orbit truncated at ${cap} calls, estimated neglected mass ${neglected.toExponential(1)}` : ""}`,
    servers: v.servers,
    waitingPositions: v.waitingPositions,
    persistence: v.persistence,
    offeredTraffic: lambda * v.meanHolding,
    timeCongestion: allBusy,
    ...retrialRateMeasures({
      freshRate: lambda,
      freshRefused: lambda * freshRefused,
      retryRate,
      retryRefused,
      lostRate: (1 - m.p) * (lambda * freshRefused + retryRefused) + lambda * lostAtCap + abandonRate,
      admitted: lambda * (1 - freshRefused) + (retryRate - retryRefused),
      admittedToWait: lambda * freshToWait + retryToWait,
      abandonRate,
      meanOrbit: orbit,
      busy,
      queue,
    }),
    orbitCap: cap,
    states: sol.states,
    neglectedMass: neglected,
    terms: sol.terms,
  };
}
