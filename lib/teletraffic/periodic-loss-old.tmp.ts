import { z } from "zod";
import { assertFiniteResult, parseInput, TeletrafficConvergenceError } from "./errors";
import { erlangBStateDistribution, MAX_TRAFFIC } from "./erlang-b";
import { periodicInfiniteServerLoad, profileField, refineProfileHasTraffic, timeVaryingHoldingField, timeVaryingServersField } from "./time-varying";

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
 */

/** Λτ per uniformisation step: large enough that the Poisson spread costs little (about 2.1 × Λτ terms per step). */
const STEP_MEAN = 100;
/** Tail mass of the Poisson weights left out per step. */
const STEP_TAIL = 1e-25;

/** Work units (state updates, i.e. (N + 1) × uniformisation terms) answered interactively, about 100 ms. */
export const INTERACTIVE_PERIODIC_WORK = 30_000_000;
export const MAX_PERIODIC_WORK = 3_000_000_000;

export const periodicLossInputSchema = z
  .object({
    servers: timeVaryingServersField,
    profile: profileField,
    meanHolding: timeVaryingHoldingField,
    tolerance: z
      .number()
      .min(1e-14)
      .max(1e-3)
      .default(1e-12)
      .describe("bound on the absolute error of every blocking value, default 1e-12; where rounding stops the iteration first, errorBound says how close it got"),
  })
  .superRefine((v, ctx) => {
    refineProfileHasTraffic(v.profile, ctx);
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

/** Cycles the contraction needs from the worst start (W1 <= N) to reach the tolerance, plus two. */
function cyclesNeeded(servers: number, tol: number, cycleInHoldings: number, oneMinusC: number): number {
  return 2 + Math.ceil(Math.log(Math.max(1, servers) / (tol * oneMinusC)) / cycleInHoldings);
}

/**
 * W1 distance to a segment's equilibrium below which the rest of the segment is taken as settled:
 * a share of the tolerance, but not below the rounding noise of W1 over N + 1 states.
 */
function settleGap(servers: number, tolerance: number, segments: number): number {
  return Math.max(tolerance / (10 * segments), 100 * (servers + 1) * Number.EPSILON);
}

/** Time after which any start is within W1 δ of a segment's equilibrium (the contraction from W1 <= N). */
function settleTime(servers: number, meanHolding: number, delta: number): number {
  return meanHolding * Math.log(Math.max(1, servers) / delta);
}

/** Estimated state updates: (N + 1) × uniformisation terms over the cycles the contraction needs from the worst start. */
export function periodicLossWork(servers: number, profile: ReadonlyArray<{ duration: number; rate: number }>, meanHolding: number, tolerance = 1e-12): number {
  const cycle = profile.reduce((s, p) => s + p.duration, 0);
  const oneMinusC = -Math.expm1(-cycle / meanHolding);
  const settle = settleTime(servers, meanHolding, settleGap(servers, tolerance, profile.length));
  let terms = 0;
  for (const s of profile) {
    const big = s.rate + servers / meanHolding;
    const theta = big * Math.min(s.duration, settle);
    const steps = Math.max(1, Math.ceil(theta / STEP_MEAN));
    // Terms per step: the Poisson(θ) weights down to STEP_TAIL, about θ + 11 √θ + 10.
    const perStep = theta / steps;
    terms += steps * (perStep + 11 * Math.sqrt(perStep) + 10);
  }
  return (servers + 1) * terms * cyclesNeeded(servers, tolerance, cycle / meanHolding, oneMinusC);
}

/** Wasserstein-1 distance between two laws on 0..N: Σ_k |F_p(k) − F_q(k)|. */
function w1(p: Float64Array, q: Float64Array): number {
  let fp = 0;
  let fq = 0;
  let sum = 0;
  for (let k = 0; k < p.length - 1; k++) {
    fp += p[k];
    fq += q[k];
    sum += Math.abs(fp - fq);
  }
  return sum;
}

function mean(p: Float64Array): number {
  let m = 0;
  for (let k = 1; k < p.length; k++) m += k * p[k];
  return m;
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
  /** Erlang's law at λ h, for early settling (undefined for segments shorter than h or above the distribution's traffic limit). */
  equilibrium?: Float64Array;
}

function planSegment(start: number, duration: number, rate: number, n: number, mu: number, h: number): SegmentPlan {
  const big = rate + n * mu;
  const steps = Math.max(1, Math.ceil((big * duration) / STEP_MEAN));
  const tau = duration / steps;
  const theta = big * tau;
  const weights: number[] = [];
  let w = Math.exp(-theta);
  let cumulative = 0;
  let k = 0;
  let leftBound = Infinity;
  for (;;) {
    weights.push(w);
    cumulative += w;
    // Σ_{j>k} w_j <= w_{k+1} / (1 − θ/(k+2)) once k + 2 > θ (ratios θ/j below θ/(k+2)).
    const next = (w * theta) / (k + 1);
    if (k + 2 > theta) {
      leftBound = next / (1 - theta / (k + 2));
      if (leftBound <= STEP_TAIL) break;
    }
    w = next;
    k++;
  }
  const tailOverBig = new Float64Array(weights.length);
  let c = 0;
  for (let j = 0; j < weights.length; j++) {
    c += weights[j];
    tailOverBig[j] = Math.max(0, 1 - c) / big;
  }
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
    weights: Float64Array.from(weights),
    tailOverBig,
    massLeft: leftBound,
    integralLeft,
    // Only segments of a holding time or more can settle; shorter ones keep no (N + 1)-vector.
    equilibrium: duration >= h && rate * h <= MAX_TRAFFIC ? Float64Array.from(erlangBStateDistribution(n, rate * h)) : undefined,
  };
}

/** Scratch space for one cycle (reused: no allocation per step). */
interface Work {
  v: Float64Array;
  u: Float64Array;
  out: Float64Array;
  stay: Float64Array;
  down: Float64Array;
}

interface CycleResult {
  /** ∫ p_N over each segment, P(all busy) and the mean busy count at each segment start, and at the cycle end. */
  blockedTime: Float64Array;
  blockingAtStart: Float64Array;
  meanAtStart: Float64Array;
  meanAtEnd: number;
  /** Bound on the W1 error of the cycle's end law and on ∫ p_N of each segment, from truncation and early settling. */
  lawError: number;
  integralError: Float64Array;
  steps: number;
}

/** Advances p (in place) through one cycle. */
function runCycle(p: Float64Array, plans: SegmentPlan[], n: number, mu: number, h: number, delta: number, work: Work): CycleResult {
  const m = plans.length;
  const blockedTime = new Float64Array(m);
  const blockingAtStart = new Float64Array(m);
  const meanAtStart = new Float64Array(m);
  const integralError = new Float64Array(m);
  let lawError = 0;
  let steps = 0;
  const { stay, down } = work;
  for (let s = 0; s < m; s++) {
    const plan = plans[s];
    blockingAtStart[s] = p[n];
    meanAtStart[s] = mean(p);
    const up = plan.rate / plan.big;
    // Row j of P: up λ/Λ, down jμ/Λ, stay (Λ − λ − jμ)/Λ = (N − j)μ/Λ (λ/Λ at N), formed without cancellation.
    for (let j = 0; j <= n; j++) {
      down[j] = (j * mu) / plan.big;
      stay[j] = j < n ? ((n - j) * mu) / plan.big : up;
    }
    let integral = 0;
    const equilibrium = plan.equilibrium;
    for (let step = 0; step < plan.steps; step++) {
      const gap = equilibrium ? w1(p, equilibrium) : Infinity;
      if (equilibrium && gap <= delta) {
        // Settled: the rest of the segment is its equilibrium to within gap e^{−μ s} at time s later.
        const rest = plan.duration - step * plan.tau;
        integral += equilibrium[n] * rest;
        integralError[s] += gap * h * -Math.expm1(-mu * rest);
        lawError += gap * Math.exp(-mu * rest);
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
      for (let k = 0; k < last; k++) {
        const wk = weights[k];
        integral += tailOverBig[k] * v[n];
        // out += w_k v and u = v P for the uniformised birth–death chain, in one pass (N >= 1).
        out[0] += wk * v[0];
        u[0] = v[0] * stay[0] + v[1] * down[1];
        for (let j = 1; j < n; j++) {
          const x = v[j];
          out[j] += wk * x;
          u[j] = v[j - 1] * up + x * stay[j] + v[j + 1] * down[j + 1];
        }
        out[n] += wk * v[n];
        u[n] = v[n - 1] * up + v[n] * stay[n];
        const t = v;
        v = u;
        u = t;
      }
      integral += tailOverBig[last] * v[n];
      for (let j = 0; j <= n; j++) out[j] += weights[last] * v[j];
      p.set(out);
      // A sub-probability short of mass ε is within W1 N ε of the law it approximates.
      lawError += n * plan.massLeft;
      integralError[s] += plan.integralLeft;
    }
    blockedTime[s] = integral;
  }
  return { blockedTime, blockingAtStart, meanAtStart, meanAtEnd: mean(p), lawError, integralError, steps };
}

export function periodicLossSystem(input: PeriodicLossInput): PeriodicLossResult {
  const { servers: n, profile, meanHolding: h, tolerance } = parseInput(periodicLossInputSchema, input);
  const mu = 1 / h;
  const plans: SegmentPlan[] = [];
  let cycle = 0;
  for (const s of profile) {
    plans.push(planSegment(cycle, s.duration, s.rate, n, mu, h));
    cycle += s.duration;
  }
  const oneMinusC = -Math.expm1(-cycle / h);
  const delta = settleGap(n, tolerance, profile.length);
  // The contraction guarantees convergence well within this; the cap only guards against rounding surprises.
  const maxCycles = 10 * cyclesNeeded(n, tolerance, cycle / h, oneMinusC) + 100;
  // Cycles over which the exact map shrinks the step at least by half (c^window <= 1/2): a step that
  // does not halve over that many cycles has reached the rounding noise, and iterating further is futile.
  const window = Math.ceil(Math.LN2 / (cycle / h)) + 1;
  const history: number[] = [];
  const work: Work = { v: new Float64Array(n + 1), u: new Float64Array(n + 1), out: new Float64Array(n + 1), stay: new Float64Array(n + 1), down: new Float64Array(n + 1) };
  // Start from the truncated Poisson law at the infinite-server load m(0): near the answer in both limits.
  const p = Float64Array.from(erlangBStateDistribution(n, Math.min(periodicInfiniteServerLoad(profile, h), 1e7)));
  const previous = new Float64Array(n + 1);
  let steps = 0;
  for (let cycles = 1; ; cycles++) {
    previous.set(p);
    const r = runCycle(p, plans, n, mu, h, delta, work);
    steps += r.steps;
    // W1(start, p*) <= (W1(start, Φ start) + η) / (1 − c); every value along the cycle inherits it.
    const step = w1(previous, p);
    const startError = (step + r.lawError) / oneMinusC;
    history.push(step);
    const stalled = history.length > window && step > 0.5 * history[history.length - 1 - window];
    if (startError > tolerance && !stalled && cycles < maxCycles) continue;
    if (startError > tolerance && !stalled) throw new TeletrafficConvergenceError(`periodic solution not within ${tolerance} after ${cycles} cycles (bound ${startError})`, cycles);
    const segments: PeriodicLossSegment[] = [];
    let offered = 0;
    let refused = 0;
    let blockedTime = 0;
    let busyTime = 0;
    let worst = 0;
    plans.forEach((plan, s) => {
      const congestion = r.blockedTime[s] / plan.duration;
      // Flow balance of the forward equations: d E[busy]/dt = λ (1 − p_N) − μ E[busy].
      const meanEnd = s + 1 < plans.length ? r.meanAtStart[s + 1] : r.meanAtEnd;
      const busy = (plan.rate * (plan.duration - r.blockedTime[s]) - (meanEnd - r.meanAtStart[s])) / mu;
      segments.push({
        start: plan.start,
        duration: plan.duration,
        rate: plan.rate,
        timeCongestion: congestion,
        callCongestion: congestion,
        blockingAtStart: r.blockingAtStart[s],
        carriedTraffic: busy / plan.duration,
      });
      offered += plan.rate * plan.duration;
      refused += plan.rate * r.blockedTime[s];
      blockedTime += r.blockedTime[s];
      busyTime += busy;
      worst = Math.max(worst, r.integralError[s] / plan.duration);
    });
    return assertFiniteResult(
      {
        method: "M(t)/M/N/N periodic forward equations: uniformisation, fixed point of the cycle map (exact to errorBound)",
        servers: n,
        cycle,
        offeredTraffic: (offered / cycle) * h,
        segments,
        callCongestion: refused / offered,
        timeCongestion: blockedTime / cycle,
        carriedTraffic: busyTime / cycle,
        errorBound: startError + r.lawError + worst,
        tolerance,
        cycles,
        steps,
      },
      "periodicLossSystem",
    );
  }
}
