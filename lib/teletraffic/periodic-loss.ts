import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, parseInput, TeletrafficConvergenceError } from "./errors";
import { MAX_TRAFFIC } from "./erlang-b";
import type { MmppQueueResult } from "./mmpp";
import { periodicRetrialSystem, periodicRetrialWork, type PeriodicRetrialInput, type PeriodicRetrialResult } from "./periodic-retrial";
import { STEP_MEAN, uniformisationWeights } from "./uniformisation";
import { periodicInfiniteServerLoad, profileField, refineProfileHasTraffic, timeVaryingHoldingField, timeVaryingServersField } from "./time-varying";
import { departureRate } from "./departures";

/**
 * Exact blocking of the M(t)/M/N/N loss system under a periodic piecewise-constant arrival rate.
 *
 * The busy count is a birth–death chain whose birth rate λ(t) changes at the segment ends; its law
 * p(t) follows the forward equations p' = p Q(t). Within a segment Q is constant and p is advanced
 * by uniformisation (Jensen 1953; Grassmann 1977, Computers & Operations Research 4): with
 * Λ = λ + N μ and P = I + Q/Λ, p(t + τ) = Σ_k Poisson(Λτ; k) p P^k, and the time integral
 * ∫_0^τ p = (1/Λ) Σ_k P(Poisson(Λτ) > k) p P^k (the cumulative form, Reibman & Trivedi 1989).
 * The periodic steady state is the fixed point of the one-cycle map Φ, found by iterating Φ from
 * the truncated Poisson law at the infinite-server load m(0) (the MOL start).
 *
 * Error control rests on one coupling fact: two copies of the chain fed the same arrivals, the
 * higher one holding the lower one's calls plus D extra calls, stay ordered, and every extra call
 * leaves at rate μ (or is matched by an arrival the higher copy refuses), so E[D(t)] <= D(0) e^{−μt}.
 * Hence Φ contracts the Wasserstein distance W1 of busy-count laws by c = e^{−T/h} per cycle, and
 * for any p, W1(p, p*) <= (W1(p, Φp) + η) / (1 − c), η being the numerical error of one cycle.
 * Since |p_N − p*_N| <= W1 at every later instant, that bound holds for every blocking value
 * computed along the cycle from p. The same fact lets a long segment stop integrating once p is
 * within W1 δ of the segment's equilibrium π (Erlang's truncated Poisson law at λ h): the rest of
 * the segment is then π, to within δ e^{−μ s} at time s later.
 *
 * Within a segment the rate is constant, so arrivals see the time average there (PASTA): a
 * segment's call congestion equals its time congestion; over the cycle, call congestion weights
 * the segments by their offered calls λ_s d_s, time congestion by their durations.
 *
 * The same machinery solves the chain with Q waiting positions (periodicQueueSystem: states
 * 0..N + Q, departures min(k, N) μ + (k − N)⁺ α); there the contraction is measured in a weighted
 * distance (see contractionFor), which reduces to the W1 argument above when Q = 0.
 */

/** Work units (state updates, i.e. (N + 1) × uniformisation terms) answered interactively, about 100 ms. */
export const INTERACTIVE_PERIODIC_WORK = 25_000_000;
export const MAX_PERIODIC_WORK = 3_000_000_000;
/** The same for the chain with waiting positions ((N + Q + 1 + 50) × terms × cycles; the occupation vector is kept). */
export const INTERACTIVE_PERIODIC_QUEUE_WORK = 12_000_000;

const toleranceField = z
  .number()
  .min(1e-14)
  .max(1e-3)
  .default(1e-12)
  .describe("bound on the absolute error of every blocking value, default 1e-12; where rounding stops the iteration first, errorBound says how close it got");

const wellFormedGroup = (servers: unknown, waitingPositions: unknown) =>
  Number.isInteger(servers) && (servers as number) >= 1 && Number.isInteger(waitingPositions) && (waitingPositions as number) >= 0;

export const periodicLossInputSchema = z
  .object({
    servers: timeVaryingServersField,
    profile: profileField,
    meanHolding: timeVaryingHoldingField,
    tolerance: toleranceField,
  })
  .superRefine((v, ctx) => {
    refineProfileHasTraffic(v.profile, ctx);
    // zod runs this refinement even when a field failed: size the work only for a well-formed group
    if (!wellFormedGroup(v.servers, 0)) return;
    const work = periodicLossWork(v.servers, v.profile, v.meanHolding, v.tolerance);
    if (work > MAX_PERIODIC_WORK) ctx.addIssue({ code: "custom", path: ["profile"], message: `estimated work ${Number(work.toPrecision(3))} exceeds ${MAX_PERIODIC_WORK} state updates` });
  })
  .describe("time-varying Poisson arrivals on N servers with exponential holding: exact periodic blocking per segment and over the cycle (forward equations)");
export type PeriodicLossInput = z.input<typeof periodicLossInputSchema>;

export interface PeriodicLossSegment {
  start: number;
  duration: number;
  rate: number;
  /** Time average of P(all N busy) over the segment; equal to the segment's call congestion (PASTA within the segment). */
  timeCongestion: number;
  callCongestion: number;
  /** P(all N busy) at the segment's start. */
  blockingAtStart: number;
  /** Time-average number of busy servers over the segment. */
  carriedTraffic: number;
}

export interface PeriodicLossResult {
  method: string;
  servers: number;
  cycle: number;
  offeredTraffic: number;
  segments: PeriodicLossSegment[];
  /** Over the cycle: calls refused / calls offered. */
  callCongestion: number;
  /** Over the cycle: fraction of time all servers are busy. */
  timeCongestion: number;
  carriedTraffic: number;
  /** Bound on the absolute error of every congestion value above (method error; rounding adds about 1e-16 per step). */
  errorBound: number;
  /** The tolerance asked for; errorBound exceeds it only where floating-point rounding stops the iteration first. */
  tolerance: number;
  cycles: number;
  steps: number;
}

/**
 * The birth–death chain shared by the loss system and the system with waiting positions: calls in
 * the system k = 0..K (K = N + Q), birth λ(t) below K, death d(k) = min(k, N) μ + (k − N)⁺ α.
 */
interface BirthDeath {
  servers: number;
  capacity: number;
  mu: number;
  alpha: number;
}

const deathOf = (m: BirthDeath, k: number) => departureRate(k, m.servers, m.mu, m.alpha);
/** d(K) − d(k), formed without cancellation (the uniformised chain's holding weight below K). */
const deathGapOf = (m: BirthDeath, k: number) => (m.servers - Math.min(k, m.servers)) * m.mu + (m.capacity - m.servers - Math.max(0, k - m.servers)) * m.alpha;

/**
 * Contraction of the cycle map in a weighted Wasserstein distance d_u(p, q) = Σ_l u_l |F_p(l) − F_q(l)|
 * (u_l: the distance between l and l + 1). For the monotone coupling of two copies of a birth–death
 * chain, d_u shrinks at rate at least κ = min_l [b(l) u_l − d(l) u_{l−1} − b(l+1) u_{l+1} + d(l+1) u_l] / u_l
 * (Chen 1996, "Estimation of spectral gap for Markov chains", Acta Math. Sinica 12). With u ≡ 1 and
 * no waiting room this is μ (the loss system's e^{−T/h} per cycle); with patience α > 0 it is at
 * least min(μ, α). Without patience the queue region contracts only under weights geometric in the
 * queue (ratio q: an M/M/1-like region, κ = λ(1 − q) + Nμ(1 − 1/q) there), which may be negative in
 * overloaded segments: the cycle then contracts by e^{−Σ κ_s d_s} if that sum is positive, and values
 * inside the cycle may grow by the largest e^{−partial sum} (`growth`).
 */
interface Contraction {
  weights: Float64Array;
  /** κ per segment (may be negative), Σ κ_s d_s, and the largest growth factor within a cycle. */
  kappa: number[];
  exponent: number;
  growth: number;
  minU: number;
  sumU: number;
}

function contractionFor(m: BirthDeath, profile: ReadonlyArray<{ duration: number; rate: number }>, q: number): Contraction {
  const n = m.servers;
  const k = m.capacity;
  const u = (l: number) => q ** Math.max(0, l - n + 1);
  // κ_l is constant on 1..N−2 and on N..K−2: boundary indices and a few inside each stretch suffice.
  const candidates = new Set<number>();
  for (const c of [0, 1, 2, n - 3, n - 2, n - 1, n, n + 1, k - 3, k - 2, k - 1]) if (c >= 0 && c <= k - 1) candidates.add(c);
  const kappa = profile.map(({ rate }) => {
    const b = (l: number) => (l < k ? rate : 0);
    let worst = Infinity;
    for (const l of candidates) {
      const ul = u(l);
      const value = b(l) - (l > 0 ? (deathOf(m, l) * u(l - 1)) / ul : 0) - (l + 1 < k ? (b(l + 1) * u(l + 1)) / ul : 0) + deathOf(m, l + 1);
      worst = Math.min(worst, value);
    }
    return worst;
  });
  let exponent = 0;
  let growth = 1;
  profile.forEach((s, i) => {
    exponent += kappa[i] * s.duration;
    growth = Math.max(growth, Math.exp(-exponent));
  });
  const weights = new Float64Array(k);
  let minU = Infinity;
  let sumU = 0;
  for (let l = 0; l < k; l++) {
    weights[l] = u(l);
    minU = Math.min(minU, weights[l]);
    sumU += weights[l];
  }
  return { weights, kappa, exponent, growth, minU, sumU };
}

/** Cycles the contraction needs from the worst start (d_u <= Σ u) to reach the tolerance, plus two. */
function cyclesNeeded(c: Contraction, tol: number): number {
  const oneMinusC = -Math.expm1(-c.exponent);
  return 2 + Math.ceil(Math.log(Math.max(1, (c.sumU * c.growth) / (c.minU * tol * oneMinusC))) / c.exponent);
}

/**
 * The weights to use: u ≡ 1 when it contracts (always without a waiting room or with patience);
 * otherwise the geometric queue weights with the fewest cycles needed. Undefined when no candidate
 * contracts over a cycle (then no error bound can be stated).
 */
function chooseContraction(m: BirthDeath, profile: ReadonlyArray<{ duration: number; rate: number }>, tol: number): Contraction | undefined {
  const flat = contractionFor(m, profile, 1);
  if (flat.exponent > 0 && flat.kappa.every((x) => x > 0)) return flat;
  const ratios = new Set<number>([1]);
  for (let i = -24; i <= 24; i++) ratios.add(2 ** (i / 12));
  for (const s of profile) if (s.rate > 0) ratios.add(Math.min(8, Math.max(1 / 8, Math.sqrt((m.servers * m.mu) / s.rate))));
  let best: Contraction | undefined;
  let bestCycles = Infinity;
  for (const q of ratios) {
    // Weights spanning more than 1e100 would make the bound meaningless before it helps.
    if (Math.abs(Math.log10(q) * (m.capacity - m.servers)) > 100) continue;
    const c = contractionFor(m, profile, q);
    if (!(c.exponent > 0)) continue;
    const cycles = cyclesNeeded(c, tol);
    if (cycles < bestCycles) {
      best = c;
      bestCycles = cycles;
    }
  }
  return best;
}

/**
 * d_u distance to a segment's equilibrium below which the rest of the segment is taken as settled:
 * a share of the tolerance, but not below the rounding noise of d_u over K + 1 states.
 */
function settleGap(c: Contraction, capacity: number, tolerance: number, segments: number): number {
  return Math.max((tolerance * c.minU) / (10 * segments * c.growth), 100 * (capacity + 1) * Number.EPSILON * c.minU);
}

/** Estimated state updates: (K + 1 + overhead) × uniformisation terms over the cycles the contraction needs from the worst start. */
function birthDeathWork(m: BirthDeath, profile: ReadonlyArray<{ duration: number; rate: number }>, tolerance: number): number {
  const c = chooseContraction(m, profile, tolerance);
  if (!c) return Infinity;
  const delta = settleGap(c, m.capacity, tolerance, profile.length);
  let terms = 0;
  profile.forEach((s, i) => {
    const big = s.rate + deathOf(m, m.capacity);
    const settle = c.kappa[i] > 0 ? Math.log(Math.max(1, c.sumU) / delta) / c.kappa[i] : Infinity;
    const theta = big * Math.min(s.duration, settle);
    const steps = Math.max(1, Math.ceil(theta / STEP_MEAN));
    // Terms per step: the Poisson(θ) weights down to STEP_TAIL, about θ + 11 √θ + 10.
    const perStep = theta / steps;
    terms += steps * (perStep + 11 * Math.sqrt(perStep) + 10);
  });
  // With a waiting room the iteration usually ends on its rounding floor, which the stall test
  // needs a window of cycles to see (the loss chain reproduces its fixed point exactly).
  const cycles = m.capacity > m.servers ? Math.max(cyclesNeeded(c, tolerance), stallWindow(c) + 2) : cyclesNeeded(c, tolerance);
  // With a waiting room each uniformisation term also costs a fixed overhead of about
  // PER_TERM_OVERHEAD state updates (measured: N = 40, Q = 8 ran at half the speed per state of N = 100).
  return (m.capacity + 1 + (m.capacity > m.servers ? PER_TERM_OVERHEAD : 0)) * terms * cycles;
}

const PER_TERM_OVERHEAD = 50;

/** Cycles over which the exact map shrinks the step at least by half. */
const stallWindow = (c: Contraction) => Math.ceil(Math.LN2 / c.exponent) + 1;

/** Estimated state updates of periodicLossSystem. */
export function periodicLossWork(servers: number, profile: ReadonlyArray<{ duration: number; rate: number }>, meanHolding: number, tolerance = 1e-12): number {
  return birthDeathWork({ servers, capacity: servers, mu: 1 / meanHolding, alpha: 0 }, profile, tolerance);
}

/** d_u(p, q) = Σ_l u_l |F_p(l) − F_q(l)|. */
function distance(p: Float64Array, q: Float64Array, u: Float64Array): number {
  let fp = 0;
  let fq = 0;
  let sum = 0;
  for (let k = 0; k < p.length - 1; k++) {
    fp += p[k];
    fq += q[k];
    sum += u[k] * Math.abs(fp - fq);
  }
  return sum;
}

/** Stationary law of the chain at a constant birth rate (product form, in logs relative to the largest term). */
function birthDeathStationary(m: BirthDeath, rate: number): Float64Array {
  const p = new Float64Array(m.capacity + 1);
  if (rate === 0) {
    p[0] = 1;
    return p;
  }
  const logs = new Float64Array(m.capacity + 1);
  let top = 0;
  for (let k = 1; k <= m.capacity; k++) {
    logs[k] = logs[k - 1] + Math.log(rate / deathOf(m, k));
    top = Math.max(top, logs[k]);
  }
  let sum = 0;
  for (let k = 0; k <= m.capacity; k++) sum += p[k] = Math.exp(logs[k] - top);
  for (let k = 0; k <= m.capacity; k++) p[k] /= sum;
  return p;
}

interface SegmentPlan {
  start: number;
  duration: number;
  rate: number;
  big: number;
  /** Uniformisation steps and each step's Λτ. */
  steps: number;
  theta: number;
  tau: number;
  /** Poisson(θ) weights and P(Poisson(θ) > k) / Λ for k = 0..K, and bounds on the mass and the integral they leave out. */
  weights: Float64Array;
  tailOverBig: Float64Array;
  massLeft: number;
  integralLeft: number;
  /** The segment's equilibrium law, for early settling (undefined for segments shorter than h or without contraction). */
  equilibrium?: Float64Array;
}

function planSegment(m: BirthDeath, start: number, duration: number, rate: number, kappa: number, h: number): SegmentPlan {
  const big = rate + deathOf(m, m.capacity);
  const steps = Math.max(1, Math.ceil((big * duration) / STEP_MEAN));
  const tau = duration / steps;
  const theta = big * tau;
  const { weights, tail, massLeft: leftBound } = uniformisationWeights(theta);
  const tailOverBig = tail.map((x) => x / big);
  // Left-out part of the integral: (1/Λ) Σ_{j>K} P(X > j) <= (1/Λ) E[X 1{X > K}] = τ P(X >= K) <= τ (w_K + tail).
  const integralLeft = tau * (weights[weights.length - 1] + leftBound);
  return {
    start,
    duration,
    rate,
    big,
    steps,
    theta,
    tau,
    weights,
    tailOverBig,
    massLeft: leftBound,
    integralLeft,
    // Only segments of a holding time or more can settle; shorter ones keep no (K + 1)-vector.
    equilibrium: duration >= h && kappa > 0 && rate * h <= MAX_TRAFFIC ? birthDeathStationary(m, rate) : undefined,
  };
}

/** Scratch space for one cycle (reused: no allocation per step). */
interface Work {
  v: Float64Array;
  u: Float64Array;
  out: Float64Array;
  occupation: Float64Array;
  stay: Float64Array;
  down: Float64Array;
}

/** Time integrals over one segment of the quantities every measure is built from. */
interface SegmentIntegrals {
  /** ∫ P(k = K), ∫ P(k >= N), ∫ E[min(k, N)], ∫ E[(k − N)⁺]. */
  full: number;
  allBusy: number;
  busy: number;
  queue: number;
  /** P(k = K) at the segment's start. */
  fullAtStart: number;
}

interface CycleResult {
  segments: SegmentIntegrals[];
  /** Bound (d_u) on the error of the cycle's end law from truncation and early settling; bound (per unit of a probability or count) on each segment's integrals. */
  lawError: number;
  integralError: Float64Array;
  steps: number;
}

function integralsOf(occupation: Float64Array, n: number, fullAtStart: number): SegmentIntegrals {
  const k = occupation.length - 1;
  let allBusy = 0;
  let busy = 0;
  let queue = 0;
  for (let j = 0; j <= k; j++) {
    const x = occupation[j];
    if (j >= n) allBusy += x;
    busy += Math.min(j, n) * x;
    queue += Math.max(0, j - n) * x;
  }
  return { full: occupation[k], allBusy, busy, queue, fullAtStart };
}

/** Advances p (in place) through one cycle. */
function runCycle(p: Float64Array, plans: SegmentPlan[], m: BirthDeath, c: Contraction, delta: number, work: Work): CycleResult {
  const k = m.capacity;
  const segments: SegmentIntegrals[] = [];
  const integralError = new Float64Array(plans.length);
  let lawError = 0;
  let steps = 0;
  const { stay, down, occupation } = work;
  for (let s = 0; s < plans.length; s++) {
    const plan = plans[s];
    const fullAtStart = p[k];
    const up = plan.rate / plan.big;
    // Row j of P: up λ/Λ, down d(j)/Λ, stay (d(K) − d(j))/Λ (λ/Λ at K), formed without cancellation.
    for (let j = 0; j <= k; j++) {
      down[j] = deathOf(m, j) / plan.big;
      stay[j] = j < k ? deathGapOf(m, j) / plan.big : up;
    }
    occupation.fill(0);
    const equilibrium = plan.equilibrium;
    const kappa = c.kappa[s];
    for (let step = 0; step < plan.steps; step++) {
      const gap = equilibrium ? distance(p, equilibrium, c.weights) : Infinity;
      if (equilibrium && gap <= delta) {
        // Settled: the rest of the segment is its equilibrium to within gap e^{−κ s} at time s later.
        const rest = plan.duration - step * plan.tau;
        for (let j = 0; j <= k; j++) occupation[j] += equilibrium[j] * rest;
        integralError[s] += ((gap / c.minU) * -Math.expm1(-kappa * rest)) / kappa;
        lawError += gap * Math.exp(-kappa * rest);
        p.set(equilibrium);
        break;
      }
      steps++;
      const { weights, tailOverBig } = plan;
      let v = work.v;
      let u = work.u;
      const out = work.out;
      v.set(p);
      out.fill(0);
      const last = weights.length - 1;
      for (let t = 0; t < last; t++) {
        const wt = weights[t];
        const ct = tailOverBig[t];
        // out += w_t v, occupation += P(X > t)/Λ v and u = v P for the uniformised chain, in one pass (K >= 1).
        let x = v[0];
        out[0] += wt * x;
        occupation[0] += ct * x;
        u[0] = x * stay[0] + v[1] * down[1];
        for (let j = 1; j < k; j++) {
          x = v[j];
          out[j] += wt * x;
          occupation[j] += ct * x;
          u[j] = v[j - 1] * up + x * stay[j] + v[j + 1] * down[j + 1];
        }
        x = v[k];
        out[k] += wt * x;
        occupation[k] += ct * x;
        u[k] = v[k - 1] * up + x * stay[k];
        const swap = v;
        v = u;
        u = swap;
      }
      for (let j = 0; j <= k; j++) {
        out[j] += weights[last] * v[j];
        occupation[j] += tailOverBig[last] * v[j];
      }
      p.set(out);
      // A sub-probability short of mass ε is within d_u ε Σu of the law it approximates.
      lawError += c.sumU * plan.massLeft;
      integralError[s] += k * plan.integralLeft;
    }
    segments.push(integralsOf(occupation, m.servers, fullAtStart));
  }
  return { segments, lawError, integralError, steps };
}

interface PeriodicSolution {
  plans: SegmentPlan[];
  segments: SegmentIntegrals[];
  cycle: number;
  errorBound: number;
  cycles: number;
  steps: number;
  /** The d_u weights' queue ratio (1: plain W1) and the cycle's contraction exponent Σ κ_s d_s. */
  weightRatio: number;
  contraction: number;
}

/**
 * The periodic steady state of the birth–death chain under a piecewise-constant periodic birth
 * rate: fixed point of the cycle map Φ, iterated from the stationary law at the infinite-server
 * load m(0), stopped when the contraction bound d_u(p, p*) <= (d_u(p, Φp) + η)/(1 − e^{−Σκd}) meets
 * the tolerance. errorBound bounds every time-average probability and mean count computed from it.
 */
function solvePeriodicBirthDeath(m: BirthDeath, profile: ReadonlyArray<{ duration: number; rate: number }>, h: number, tolerance: number): PeriodicSolution {
  const c = chooseContraction(m, profile, tolerance);
  if (!c) throw new TeletrafficConvergenceError("no contraction bound over the cycle: the waiting room stays overloaded for most of the cycle (add patience, or fewer waiting positions)", 0);
  const plans: SegmentPlan[] = [];
  let cycle = 0;
  profile.forEach((s, i) => {
    plans.push(planSegment(m, cycle, s.duration, s.rate, c.kappa[i], h));
    cycle += s.duration;
  });
  const oneMinusC = -Math.expm1(-c.exponent);
  const delta = settleGap(c, m.capacity, tolerance, profile.length);
  // The contraction guarantees convergence well within this; the cap only guards against rounding surprises.
  const maxCycles = 10 * cyclesNeeded(c, tolerance) + 100;
  // Cycles over which the exact map shrinks the step at least by half: a step that does not halve
  // over that many cycles has reached the rounding noise, and iterating further is futile.
  const window = stallWindow(c);
  const history: number[] = [];
  const size = m.capacity + 1;
  const work: Work = { v: new Float64Array(size), u: new Float64Array(size), out: new Float64Array(size), occupation: new Float64Array(size), stay: new Float64Array(size), down: new Float64Array(size) };
  // Start from the stationary law at the infinite-server load m(0) (for the loss system Erlang's law at the MOL start).
  const p = birthDeathStationary(m, Math.min(periodicInfiniteServerLoad(profile, h), 1e7) / h);
  const previous = new Float64Array(size);
  let steps = 0;
  for (let cycles = 1; ; cycles++) {
    previous.set(p);
    const r = runCycle(p, plans, m, c, delta, work);
    steps += r.steps;
    const step = distance(previous, p, c.weights);
    const startError = (step + r.lawError) / oneMinusC;
    // The start's error in plain W1 units, grown at most by `growth` along the cycle.
    const startValueError = (c.growth * startError) / c.minU;
    history.push(step);
    // Stalled: the step no longer halves over the window (rounding), or it is already below the
    // cycle's own numerical error, which then floors the bound whatever the number of cycles.
    const stalled = (history.length > window && step > 0.5 * history[history.length - 1 - window]) || step <= r.lawError;
    if (startValueError > tolerance && !stalled && cycles < maxCycles) continue;
    if (startValueError > tolerance && !stalled) throw new TeletrafficConvergenceError(`periodic solution not within ${tolerance} after ${cycles} cycles (bound ${startValueError})`, cycles);
    let worst = 0;
    plans.forEach((plan, s) => (worst = Math.max(worst, r.integralError[s] / plan.duration)));
    // Every value along the cycle: the start's error plus the cycle's own numerical error, grown at most by `growth`.
    return { plans, segments: r.segments, cycle, errorBound: (c.growth * (startError + r.lawError)) / c.minU + worst, cycles, steps, weightRatio: c.weights.length > 1 ? c.weights[c.weights.length - 1] / c.weights[c.weights.length - 2] : 1, contraction: c.exponent };
  }
}

export function periodicLossSystem(input: PeriodicLossInput): PeriodicLossResult {
  const { servers: n, profile, meanHolding: h, tolerance } = parseInput(periodicLossInputSchema, input);
  const sol = solvePeriodicBirthDeath({ servers: n, capacity: n, mu: 1 / h, alpha: 0 }, profile, h, tolerance);
  const segments: PeriodicLossSegment[] = [];
  let offered = 0;
  let refused = 0;
  let blockedTime = 0;
  let busyTime = 0;
  sol.plans.forEach((plan, s) => {
    const g = sol.segments[s];
    const congestion = g.full / plan.duration;
    segments.push({
      start: plan.start,
      duration: plan.duration,
      rate: plan.rate,
      timeCongestion: congestion,
      callCongestion: congestion,
      blockingAtStart: g.fullAtStart,
      carriedTraffic: g.busy / plan.duration,
    });
    offered += plan.rate * plan.duration;
    refused += plan.rate * g.full;
    blockedTime += g.full;
    busyTime += g.busy;
  });
  return assertFiniteResult(
    {
      method: "M(t)/M/N/N periodic forward equations: uniformisation, fixed point of the cycle map (exact to errorBound)",
      servers: n,
      cycle: sol.cycle,
      offeredTraffic: (offered / sol.cycle) * h,
      segments,
      callCongestion: refused / offered,
      timeCongestion: blockedTime / sol.cycle,
      carriedTraffic: busyTime / sol.cycle,
      errorBound: sol.errorBound,
      tolerance,
      cycles: sol.cycles,
      steps: sol.steps,
    },
    "periodicLossSystem",
  );
}

export const periodicQueueInputSchema = z
  .object({
    servers: timeVaryingServersField,
    waitingPositions: z.number().int().min(1).max(100_000).describe("waiting positions Q (FIFO)"),
    profile: profileField,
    meanHolding: timeVaryingHoldingField,
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a waiting call (it abandons after it); default: waits for ever"),
    tolerance: toleranceField,
  })
  .superRefine((v, ctx) => {
    refineProfileHasTraffic(v.profile, ctx);
    if (!wellFormedGroup(v.servers, v.waitingPositions)) return;
    const work = periodicQueueWork(v.servers, v.waitingPositions, v.profile, v.meanHolding, v.meanPatience, v.tolerance);
    if (work > MAX_PERIODIC_WORK) ctx.addIssue({ code: "custom", path: ["profile"], message: `estimated work ${Number(work.toPrecision(3))} exceeds ${MAX_PERIODIC_WORK} state updates` });
  })
  .describe(`time-varying Poisson arrivals on N servers with Q waiting positions (exponential holding, optional exponential patience): exact periodic measures (forward equations). ${WAITING_MEASURES}`);
export type PeriodicQueueInput = z.input<typeof periodicQueueInputSchema>;

/** Estimated state updates of periodicQueueSystem (by the bracketed solver where no contraction can be bounded). */
export function periodicQueueWork(
  servers: number,
  waitingPositions: number,
  profile: ReadonlyArray<{ duration: number; rate: number }>,
  meanHolding: number,
  meanPatience?: number,
  tolerance = 1e-12,
): number {
  const work = birthDeathWork({ servers, capacity: servers + waitingPositions, mu: 1 / meanHolding, alpha: meanPatience ? 1 / meanPatience : 0 }, profile, tolerance);
  return Number.isFinite(work) ? work : periodicRetrialWork(bracketedQueueInput(servers, waitingPositions, profile, meanHolding, meanPatience, tolerance));
}

/** The plain queue as the bracketed periodic chain without an orbit (periodic-retrial.ts, persistence 0). */
function bracketedQueueInput(
  servers: number,
  waitingPositions: number,
  profile: ReadonlyArray<{ duration: number; rate: number }>,
  meanHolding: number,
  meanPatience: number | undefined,
  tolerance: number,
): PeriodicRetrialInput {
  // Its intervals close down to rounding at about 1e-10, not 1e-12.
  return { servers, waitingPositions, profile: [...profile], meanHolding, meanPatience, persistence: 0, meanRetryDelay: 1, tolerance: Math.max(tolerance, 1e-10) };
}

export interface PeriodicQueueSegment {
  start: number;
  duration: number;
  rate: number;
  /** Share of the segment's arrivals refused (servers and waiting positions all taken) = time average of P(k = N + Q). */
  callCongestion: number;
  /** Time average of P(all N servers busy). */
  timeCongestion: number;
  carriedTraffic: number;
  meanQueueLength: number;
}

/** The measures of the stationary queue (as mmppQueueSystem), over the cycle, with the segments and the error bound. */
export interface PeriodicQueueResult extends MmppQueueResult {
  cycle: number;
  segments: PeriodicQueueSegment[];
  /** Bound on the absolute error of every time-average probability and mean count (ratios of them inherit it). */
  errorBound: number;
  tolerance: number;
  cycles: number;
  steps: number;
}

/**
 * Exact periodic M(t)/M/N/N+Q (+M): the same forward equations on N + Q + 1 states. Arrivals in a
 * segment see its time average (PASTA within the segment); over a cycle in the periodic regime,
 * Little's law holds for the waiting calls (each cycle admits and releases the same expected
 * number), so the mean wait of admitted calls is ∫ E[queue] / admitted calls per cycle.
 */
export function periodicQueueSystem(input: PeriodicQueueInput): PeriodicQueueResult {
  const { servers: n, waitingPositions: q, profile, meanHolding: h, meanPatience, tolerance } = parseInput(periodicQueueInputSchema, input);
  const alpha = meanPatience !== undefined ? 1 / meanPatience : 0;
  const model: BirthDeath = { servers: n, capacity: n + q, mu: 1 / h, alpha };
  // No contraction to bound (no patience, the room overloaded most of the cycle): the chain is still
  // monotone, so the bracketed solver gives the values with a stated error instead.
  const bracketed = () => bracketedQueue(periodicRetrialSystem(bracketedQueueInput(n, q, profile, h, meanPatience, tolerance)));
  if (!chooseContraction(model, profile, tolerance)) return bracketed();
  const sol = solvePeriodicBirthDeath(model, profile, h, tolerance);
  // Weights spanning many orders over a large room can leave the contraction bound far above the
  // rounding floor: then the bracketed solution, whose intervals close to about 1e-10, is taken if tighter.
  if (sol.errorBound > BRACKET_ABOVE) {
    const b = bracketed();
    if (b.errorBound < sol.errorBound) return b;
  }
  const segments: PeriodicQueueSegment[] = [];
  let offered = 0;
  let refused = 0;
  let admitted = 0;
  let admittedToWait = 0;
  let allBusy = 0;
  let busy = 0;
  let queue = 0;
  sol.plans.forEach((plan, s) => {
    const g = sol.segments[s];
    segments.push({
      start: plan.start,
      duration: plan.duration,
      rate: plan.rate,
      callCongestion: g.full / plan.duration,
      timeCongestion: g.allBusy / plan.duration,
      carriedTraffic: g.busy / plan.duration,
      meanQueueLength: g.queue / plan.duration,
    });
    offered += plan.rate * plan.duration;
    refused += plan.rate * g.full;
    admitted += plan.rate * (plan.duration - g.full);
    admittedToWait += plan.rate * (g.allBusy - g.full);
    allBusy += g.allBusy;
    busy += g.busy;
    queue += g.queue;
  });
  const abandoned = alpha * queue;
  return assertFiniteResult(
    {
      method: `M(t)/M/N/N+Q${alpha > 0 ? " with exponential patience" : ""} periodic forward equations: uniformisation, fixed point of the cycle map (exact to errorBound${sol.weightRatio !== 1 ? `; distance weighted ×${sol.weightRatio.toPrecision(3)} per waiting position` : ""})`,
      servers: n,
      waitingPositions: q,
      cycle: sol.cycle,
      offeredTraffic: (offered / sol.cycle) * h,
      segments,
      callCongestion: refused / offered,
      timeCongestion: allBusy / sol.cycle,
      carriedTraffic: busy / sol.cycle,
      waitingProbability: admitted > 0 ? admittedToWait / admitted : 0,
      meanWait: admitted > 0 ? queue / admitted : 0,
      meanQueueLength: queue / sol.cycle,
      abandonmentProbability: admitted > 0 ? abandoned / admitted : 0,
      lossProbability: Math.min(1, (refused + abandoned) / offered),
      errorBound: sol.errorBound,
      tolerance,
      cycles: sol.cycles,
      steps: sol.steps,
    },
    "periodicQueueSystem",
  );
}

/** Contraction bounds above this are retried with the bracketed solver. */
const BRACKET_ABOVE = 1e-8;

function bracketedQueue(r: PeriodicRetrialResult): PeriodicQueueResult {
  return {
    method: r.method,
    servers: r.servers,
    waitingPositions: r.waitingPositions,
    cycle: r.cycle,
    offeredTraffic: r.offeredTraffic,
    segments: r.segments.map((g) => ({ start: g.start, duration: g.duration, rate: g.rate, callCongestion: g.firstAttemptBlocking, timeCongestion: g.timeCongestion, carriedTraffic: g.carriedTraffic, meanQueueLength: g.meanQueueLength })),
    callCongestion: r.firstAttemptBlocking,
    timeCongestion: r.timeCongestion,
    carriedTraffic: r.carriedTraffic,
    waitingProbability: r.waitingProbability,
    meanWait: r.meanWait,
    meanQueueLength: r.meanQueueLength,
    abandonmentProbability: r.abandonmentProbability,
    lossProbability: r.lossProbability,
    // The bracketed bound is relative for means above 1; this result's bound is absolute throughout.
    errorBound: r.errorBound * Math.max(1, r.carriedTraffic, r.meanQueueLength, r.meanWait, ...r.segments.map((g) => Math.max(g.carriedTraffic, g.meanQueueLength))),
    tolerance: r.tolerance,
    cycles: r.cycles,
    steps: r.steps,
  };
}
