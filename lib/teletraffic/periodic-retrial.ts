import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput, TeletrafficConvergenceError } from "./errors";
import { STEP_MEAN, uniformisationWeights } from "./uniformisation";
import { cappedStationaryLaw, extrapolatedTail, levelMass, stationaryOrbitCap, TRUNCATION_BOUND, type MarkovSystemModel, type RetrialRateMeasures } from "./retrial-chain";
import { profileField, refineProfileHasTraffic, timeVaryingHoldingField } from "./time-varying";
import { departureRate } from "./departures";

/**
 * Exact retrials under a time-varying load: Poisson fresh calls at a periodic piecewise-constant
 * rate λ(t), N servers, Q waiting positions (FIFO, exponential patience α), exponential holding
 * (μ), and an orbit of refused calls that retry with persistence p after exponential delays (θ per
 * call). The state (k calls at the group, o calls in orbit) is a continuous-time Markov chain; its
 * law follows the forward equations, advanced through each segment by uniformisation (Jensen 1953;
 * Grassmann 1977), with the time integrals in the cumulative form (Reibman & Trivedi 1989). The orbit
 * is capped at M; a refused call that would join a full orbit is lost.
 *
 * Error control rests on monotonicity rather than on a contraction rate. The uniformised chain has
 * a coupling that keeps two copies ordered in (k, o) componentwise: an arrival the lower copy admits
 * and the upper refuses moves the upper one up the orbit or nowhere; a retry the lower copy makes
 * good is matched by the upper one's retry (made good or not); departures are coupled through one
 * uniform draw, the death rate being increasing in k. So the chain is stochastically monotone
 * (Massey 1987, Math. Oper. Res. 12; Kamae, Krengel & O'Brien 1977, Ann. Probab. 5), and more
 * arrivals give a larger chain. Hence the periodic steady state p*(t) lies, at every t and for
 * every increasing function, between the laws propagated from any start below it and any start
 * above it: here the stationary law at the lowest segment rate and at the highest (both with the
 * same cap). Every measure below is built from time integrals of increasing functions (P(k = K),
 * P(k >= N), E[min(k, N)], E[(k − N)⁺], P(k > N), E[o]), so each comes with an interval that holds
 * for the capped chain whatever the number of cycles; iteration stops when the intervals are
 * narrower than the tolerance, and the midpoint is reported with the half-width as errorBound.
 *
 * Ratios over the cycle use its flow balance in the periodic regime (the expected content of the
 * group and of the orbit is the same at both ends of a cycle): admitted attempts = served + abandoned;
 * calls entering the waiting room = calls moving from it to a server (N μ P(k > N)) + abandoned ones;
 * fresh calls lost for good = fresh calls − served. First-attempt blocking in a segment is the
 * segment's time average of P(k = K) (PASTA within the segment).
 *
 * The cap: the chain at the constant highest rate dominates the periodic one, so when that chain
 * is stable its stationary orbit tail bounds the periodic tail at every instant; M is where that
 * tail falls below TRUNCATION_BOUND (retrial-chain.ts). When the peak overloads an orbit that never
 * gives up (p = 1 and a peak above N/h + Q/patience), M starts from the mean rate and is doubled until
 * the upper law's own extrapolated tail, watched at every step of the cycle, is below the bound.
 */

export const MAX_PERIODIC_RETRIAL_STATES = 400_000;
/** State updates (both bounding laws) answered interactively, about 100 ms. */
export const INTERACTIVE_PERIODIC_RETRIAL_WORK = 13_000_000;
export const MAX_PERIODIC_RETRIAL_WORK = 5_000_000_000;

const meanField = (what: string) => z.number().gt(0).max(1e12).describe(what);

export const periodicRetrialInputSchema = z
  .object({
    servers: z.number().int().min(1).max(10_000).describe("integer number of servers N"),
    waitingPositions: z.number().int().min(0).max(10_000).default(0).describe("waiting positions Q (FIFO), default 0"),
    profile: profileField,
    meanHolding: timeVaryingHoldingField,
    persistence: z.number().min(0).max(1).describe("probability that a refused call tries again (after every refusal), 0..1 (0: no retrials, the bracketed solution of the plain queue)"),
    meanRetryDelay: meanField("mean exponential delay before a repeated attempt"),
    meanPatience: meanField("mean exponential patience of a waiting call; default: waits for ever").optional(),
    tolerance: z
      .number()
      .min(1e-10)
      .max(1e-3)
      .default(1e-9)
      .describe("bound on the error of every probability (absolute) and every mean (relative, above 1), default 1e-9"),
  })
  .superRefine((v, ctx) => {
    refineProfileHasTraffic(v.profile, ctx);
    if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
    const { cycle, meanRate } = cycleOf(v.profile);
    if (cycle > 0 && v.persistence === 1 && !belowExitCapacity(v, meanRate))
      ctx.addIssue({
        code: "custom",
        path: ["profile"],
        message: `with persistence 1 the orbit never gives up, so it is stable only for a mean call rate below what the group can clear when full (N/h + Q/patience = ${exitCapacity(v).toPrecision(4)} per time unit); the profile offers ${meanRate.toPrecision(4)}`,
      });
    // zod runs this even when a field failed: size the work only for a well-formed input
    if (ctx.issues.length === 0 && Number.isInteger(v.servers) && v.servers >= 1) {
      const work = workOf(v as Parsed);
      if (!Number.isFinite(work)) ctx.addIssue({ code: "custom", path: ["profile"], message: `the orbit of retrying calls needs more than ${MAX_PERIODIC_RETRIAL_STATES} states at this load` });
      else if (work > MAX_PERIODIC_RETRIAL_WORK) ctx.addIssue({ code: "custom", path: ["profile"], message: `estimated work ${Number(work.toPrecision(3))} exceeds ${MAX_PERIODIC_RETRIAL_WORK} state updates` });
    }
  })
  .describe(`time-varying Poisson fresh calls on N servers (+ Q waiting positions) with an orbit of retrying calls: exact periodic measures per segment and over the cycle, with a stated error bound. ${WAITING_MEASURES}`);
export type PeriodicRetrialInput = z.input<typeof periodicRetrialInputSchema>;
type Parsed = z.output<typeof periodicRetrialInputSchema>;

export interface PeriodicRetrialSegment {
  start: number;
  duration: number;
  rate: number;
  /** Share of the segment's fresh calls refused at their first attempt = time average of P(k = N + Q). */
  firstAttemptBlocking: number;
  /** Time average of P(all N servers busy). */
  timeCongestion: number;
  carriedTraffic: number;
  meanOrbit: number;
  meanQueueLength: number;
}

/** Over the cycle, the measures every retrial chain reports (retrial-chain.ts), each within errorBound. */
export interface PeriodicRetrialResult extends RetrialRateMeasures {
  method: string;
  servers: number;
  waitingPositions: number;
  cycle: number;
  /** Fresh offered traffic, cycle average (erlangs). */
  offeredTraffic: number;
  segments: PeriodicRetrialSegment[];
  timeCongestion: number;
  orbitCap: number;
  /** Estimated probability that the orbit is at or beyond the cap at any instant (see the header). */
  neglectedMass: number;
  /** Half-width of the interval every value is known to lie in (probabilities absolute, means relative above 1). */
  errorBound: number;
  tolerance: number;
  states: number;
  cycles: number;
  steps: number;
}

function cycleOf(profile: ReadonlyArray<{ duration: number; rate: number }>): { cycle: number; meanRate: number } {
  let cycle = 0;
  let calls = 0;
  for (const s of profile) {
    cycle += s.duration;
    calls += s.rate * s.duration;
  }
  return { cycle, meanRate: cycle > 0 ? calls / cycle : 0 };
}

interface Chain {
  n: number;
  kMax: number;
  cap: number;
  mu: number;
  alpha: number;
  p: number;
  theta: number;
}

const deathOf = (c: Chain, k: number) => departureRate(k, c.n, c.mu, c.alpha);

function stationaryModel(v: Parsed, rate: number): MarkovSystemModel {
  return {
    servers: v.servers,
    waitingPositions: v.waitingPositions,
    meanHolding: v.meanHolding,
    patienceRate: v.meanPatience !== undefined ? 1 / v.meanPatience : 0,
    arrivals: { kind: "poisson", rate },
    persistence: v.persistence,
    retryRate: 1 / v.meanRetryDelay,
  };
}

/** Uniformisation terms per cycle for cap M (the rate bound Λ grows with M θ). */
function termsPerCycle(c: Chain, profile: ReadonlyArray<{ duration: number; rate: number }>): number {
  let terms = 0;
  for (const s of profile) {
    const theta = (s.rate + deathOf(c, c.kMax) + c.cap * c.theta) * s.duration;
    const steps = Math.max(1, Math.ceil(theta / STEP_MEAN));
    const perStep = theta / steps;
    terms += steps * (perStep + 11 * Math.sqrt(perStep) + 10);
  }
  return terms;
}

/**
 * Cycles the bracket needs to close, about 30 (holding time + retry delay) over the cycle length,
 * at least 3 (measured with the bounding laws started at the extreme rates' equilibria: 5, 9 and 12
 * cycles for cycles of 12, 8 and 6 holding times at a retry delay of one holding time).
 */
const cyclesEstimate = (v: Parsed) => Math.max(3, Math.ceil((30 * (v.meanHolding + v.meanRetryDelay)) / cycleOf(v.profile).cycle));

/**
 * Estimated state updates (both bounding laws, a typical number of cycles) and the cap, from the
 * shape alone; Infinity when the cap cannot be found within the state limit.
 */
export function periodicRetrialWork(input: PeriodicRetrialInput): number {
  const v = periodicRetrialInputSchema.safeParse(input);
  // An input the schema refuses costs nothing: evaluating it answers with the input error at once.
  return v.success ? workOf(v.data) : 0;
}

function workOf(v: Parsed): number {
  try {
    const c = chainOf(v, initialCap(v).cap);
    return 2 * (c.kMax + 1) * (c.cap + 1) * termsPerCycle(c, v.profile) * cyclesEstimate(v);
  } catch {
    return Infinity;
  }
}

function chainOf(v: Parsed, cap: number): Chain {
  return {
    n: v.servers,
    kMax: v.servers + v.waitingPositions,
    cap,
    mu: 1 / v.meanHolding,
    alpha: v.meanPatience !== undefined ? 1 / v.meanPatience : 0,
    p: v.persistence,
    theta: 1 / v.meanRetryDelay,
  };
}

/** The rate at which a full group clears calls: N/h by service, plus Q/patience by abandonment. */
const exitCapacity = (v: Pick<Parsed, "servers" | "waitingPositions" | "meanHolding" | "meanPatience">) => v.servers / v.meanHolding + (v.meanPatience !== undefined ? v.waitingPositions / v.meanPatience : 0);
const belowExitCapacity = (v: Pick<Parsed, "servers" | "waitingPositions" | "meanHolding" | "meanPatience">, rate: number) => rate < exitCapacity(v);
/** The chain at the constant peak rate is stable (it then dominates the periodic one): an orbit that gives up, or a peak the group clears. */
const peakStable = (v: Parsed, peak: number) => v.persistence < 1 || belowExitCapacity(v, peak);

/**
 * The first cap and, when the chain at the peak rate is stable (it then dominates the periodic one
 * at every instant), its orbit tail beyond the cap; else twice the mean rate's cap and no tail yet.
 */
function initialCap(v: Parsed): { cap: number; dominatedTail?: number } {
  const peak = Math.max(...v.profile.map((s) => s.rate));
  const width = v.servers + v.waitingPositions + 1;
  const maxStates = MAX_PERIODIC_RETRIAL_STATES;
  if (v.persistence === 0) return { cap: 0, dominatedTail: 0 }; // no orbit: the plain queue
  if (peakStable(v, peak)) {
    const dominating = stationaryOrbitCap(stationaryModel(v, peak), TRUNCATION_BOUND, maxStates * 4);
    return { cap: Math.max(2, dominating.cap), dominatedTail: dominating.tail };
  }
  const cap = 2 * stationaryOrbitCap(stationaryModel(v, cycleOf(v.profile).meanRate), TRUNCATION_BOUND, maxStates * 4).cap;
  if ((cap + 1) * width > maxStates) throw inputError("profile", `the orbit needs more than ${Math.floor(maxStates / width) - 1} levels (${maxStates} states)`);
  return { cap };
}

/** Per-segment uniformisation data: Λ, step count, Poisson weights and P(X > t)/Λ, and the rows of P. */
interface Plan {
  start: number;
  duration: number;
  rate: number;
  big: number;
  steps: number;
  weights: Float64Array;
  tailOverBig: Float64Array;
  massLeft: number;
  stay: Float64Array;
  /** d(k + 1)/Λ: a departure from k + 1 lands in k. */
  down: Float64Array;
}

function planSegment(c: Chain, start: number, duration: number, rate: number): Plan {
  const big = rate + deathOf(c, c.kMax) + c.cap * c.theta;
  const steps = Math.max(1, Math.ceil((big * duration) / STEP_MEAN));
  const { weights, tail, massLeft } = uniformisationWeights((big * duration) / steps);
  const width = c.kMax + 1;
  const stay = new Float64Array(width * (c.cap + 1));
  // 1 − (rate out)/Λ, formed from the rates that stay so no cancellation occurs.
  for (let o = 0; o <= c.cap; o++) {
    const idleRetry = (c.cap - o) * c.theta;
    for (let k = 0; k < c.kMax; k++) stay[o * width + k] = (deathOf(c, c.kMax) - deathOf(c, k) + idleRetry) / big;
    // a refused call that does not retry, or finds the orbit full, is lost: no move
    const refusedStays = o < c.cap ? rate * (1 - c.p) : rate;
    stay[o * width + c.kMax] = (refusedStays + idleRetry + o * c.theta * c.p) / big;
  }
  const down = Float64Array.from({ length: width }, (_, k) => (k < c.kMax ? deathOf(c, k + 1) / big : 0));
  return { start, duration, rate, big, steps, weights, tailOverBig: tail.map((x) => x / big), massLeft, stay, down };
}

/** Time integrals over one segment of the increasing functions every measure is built from. */
interface Integrals {
  full: number;
  allBusy: number;
  busy: number;
  queue: number;
  beyond: number;
  orbit: number;
}

function integralsOf(c: Chain, occupation: Float64Array): Integrals {
  const width = c.kMax + 1;
  const r: Integrals = { full: 0, allBusy: 0, busy: 0, queue: 0, beyond: 0, orbit: 0 };
  for (let o = 0; o <= c.cap; o++) {
    for (let k = 0; k <= c.kMax; k++) {
      const x = occupation[o * width + k];
      if (x === 0) continue;
      if (k === c.kMax) r.full += x;
      if (k >= c.n) r.allBusy += x;
      if (k > c.n) r.beyond += x;
      r.busy += Math.min(k, c.n) * x;
      r.queue += Math.max(0, k - c.n) * x;
      r.orbit += o * x;
    }
  }
  return r;
}

/** Scratch vectors for one law. */
interface Scratch {
  v: Float64Array;
  u: Float64Array;
  out: Float64Array;
  occupation: Float64Array;
}

/**
 * One uniformisation term for all states: u = v P (the uniformised chain), out += w v and
 * occupation += (P(X > t)/Λ) v in the same pass. Written out by hand over the state grid: it is
 * the whole cost of the method (measured: about 2 × 10⁸ state updates per second).
 */
function term(c: Chain, plan: Plan, v: Float64Array, u: Float64Array, out: Float64Array, occupation: Float64Array, w: number, ct: number): void {
  const width = c.kMax + 1;
  const kMax = c.kMax;
  const cap = c.cap;
  const up = plan.rate / plan.big;
  const join = (plan.rate * c.p) / plan.big;
  const stay = plan.stay;
  const down = plan.down;
  for (let o = 0; o <= cap; o++) {
    const base = o * width;
    // a call of level o + 1 retries: into a free place (k − 1 → k) or, refused, leaving the orbit at K
    const retry = o < cap ? ((o + 1) * c.theta) / plan.big : 0;
    const above = o < cap ? width - 1 : 0; // offset of (k − 1, o + 1) from (k, o); unused at the cap
    let x = v[base];
    out[base] += w * x;
    occupation[base] += ct * x;
    u[base] = x * stay[base] + v[base + 1] * down[0];
    // Interior k = 1..K − 1, the whole cost; at the cap retry is 0 and `above` points inside the level.
    for (let i = base + 1, k = 1; k < kMax; i++, k++) {
      x = v[i];
      out[i] += w * x;
      occupation[i] += ct * x;
      u[i] = x * stay[i] + v[i - 1] * up + v[i + 1] * down[k] + v[i + above] * retry;
    }
    const i = base + kMax;
    x = v[i];
    out[i] += w * x;
    occupation[i] += ct * x;
    let y = x * stay[i] + v[i - 1] * up + v[i + above] * retry;
    if (o > 0) y += v[i - width] * join;
    if (o < cap) y += v[i + width] * retry * (1 - c.p);
    u[i] = y;
  }
}

/**
 * Advances the law p (in place) through one cycle; returns the segments' integrals and, when asked,
 * the largest extrapolated orbit tail at the cap seen at any step of the cycle (the orbit may build
 * up in a peak and drain before the cycle ends).
 */
function runCycle(c: Chain, plans: Plan[], p: Float64Array, s: Scratch, watchTail = false): { integrals: Integrals[]; steps: number; massLeft: number; tail: number } {
  const integrals: Integrals[] = [];
  let steps = 0;
  let massLeft = 0;
  let tail = watchTail && c.cap >= 2 ? extrapolatedCapTail(p, c) : 0;
  for (const plan of plans) {
    s.occupation.fill(0);
    for (let step = 0; step < plan.steps; step++) {
      let v = s.v;
      let u = s.u;
      v.set(p);
      s.out.fill(0);
      const last = plan.weights.length - 1;
      for (let t = 0; t < last; t++) {
        term(c, plan, v, u, s.out, s.occupation, plan.weights[t], plan.tailOverBig[t]);
        const swap = v;
        v = u;
        u = swap;
      }
      const w = plan.weights[last];
      const ct = plan.tailOverBig[last];
      for (let i = 0; i < v.length; i++) {
        s.out[i] += w * v[i];
        s.occupation[i] += ct * v[i];
      }
      p.set(s.out);
      massLeft += plan.massLeft;
      steps++;
      if (watchTail && c.cap >= 2) tail = Math.max(tail, extrapolatedCapTail(p, c));
    }
    integrals.push(integralsOf(c, s.occupation));
  }
  return { integrals, steps, massLeft, tail };
}

/** The cycle's measures from the segments' integrals. */
function measuresOf(c: Chain, plans: Plan[], g: Integrals[]) {
  let cycle = 0;
  let fresh = 0;
  let refusedFresh = 0;
  const t: Integrals = { full: 0, allBusy: 0, busy: 0, queue: 0, beyond: 0, orbit: 0 };
  plans.forEach((plan, i) => {
    cycle += plan.duration;
    fresh += plan.rate * plan.duration;
    refusedFresh += plan.rate * g[i].full;
    for (const key of Object.keys(t) as Array<keyof Integrals>) t[key] += g[i][key];
  });
  const served = c.mu * t.busy;
  const abandoned = c.alpha * t.queue;
  const admitted = served + abandoned;
  const attempts = fresh + c.theta * t.orbit;
  return {
    cycle,
    fresh,
    firstAttemptBlocking: refusedFresh / fresh,
    timeCongestion: t.allBusy / cycle,
    attemptCongestion: Math.max(0, 1 - admitted / attempts),
    attemptsPerCall: attempts / fresh,
    lossProbability: Math.min(1, Math.max(0, 1 - served / fresh)),
    meanOrbit: t.orbit / cycle,
    carriedTraffic: t.busy / cycle,
    waitingProbability: admitted > 0 ? (c.n * c.mu * t.beyond + abandoned) / admitted : 0,
    meanWait: admitted > 0 ? t.queue / admitted : 0,
    meanQueueLength: t.queue / cycle,
    abandonmentProbability: admitted > 0 ? abandoned / admitted : 0,
  };
}
type Measures = ReturnType<typeof measuresOf>;

/** Probabilities: absolute; means (orbit, carried, queue, wait, attempts): relative above 1. */
const PROBABILITIES = new Set(["firstAttemptBlocking", "timeCongestion", "attemptCongestion", "lossProbability", "waitingProbability", "abandonmentProbability"]);
const scaleOf = (key: string, value: number) => (PROBABILITIES.has(key) ? 1 : Math.max(1, Math.abs(value)));

/**
 * Interval of a measure from the two bounding laws. Each measure is a monotone function of the
 * integrals (increasing or decreasing in each), so its values at the lower and at the upper law are
 * not always its ends: the interval is formed from the integrals' ends by interval arithmetic.
 */
function intervals(c: Chain, plans: Plan[], lo: Integrals[], hi: Integrals[]): { mid: Measures; half: Record<string, number>; segmentHalf: number } {
  // Every integral is increasing in the state, so lo <= true <= hi for each one; evaluate the measures
  // at the corners that make them smallest and largest (monotone in each integral).
  const corner = (pick: (key: keyof Integrals) => "lo" | "hi") =>
    lo.map((l, i) => {
      const r = {} as Integrals;
      for (const key of Object.keys(l) as Array<keyof Integrals>) r[key] = pick(key) === "lo" ? l[key] : hi[i][key];
      return r;
    });
  const all = (x: "lo" | "hi") => corner(() => x);
  const mLo = measuresOf(c, plans, all("lo"));
  const mHi = measuresOf(c, plans, all("hi"));
  // Ratios with the same integral on both sides: take both corners of their numerator and denominator.
  const extra = [
    measuresOf(c, plans, corner((k) => (k === "orbit" ? "hi" : "lo"))),
    measuresOf(c, plans, corner((k) => (k === "orbit" ? "lo" : "hi"))),
    measuresOf(c, plans, corner((k) => (k === "busy" ? "hi" : "lo"))),
    measuresOf(c, plans, corner((k) => (k === "busy" ? "lo" : "hi"))),
    measuresOf(c, plans, corner((k) => (k === "queue" ? "hi" : "lo"))),
    measuresOf(c, plans, corner((k) => (k === "queue" ? "lo" : "hi"))),
    // waiting probability rises or falls with the queue integral, by the sign of busy − N·beyond
    measuresOf(c, plans, corner((k) => (k === "beyond" ? "hi" : "lo"))),
    measuresOf(c, plans, corner((k) => (k === "beyond" ? "lo" : "hi"))),
  ];
  const mid = { ...mLo };
  const half: Record<string, number> = {};
  for (const key of Object.keys(mLo) as Array<keyof Measures>) {
    const values = [mLo[key], mHi[key], ...extra.map((e) => e[key])];
    const a = Math.min(...values);
    const b = Math.max(...values);
    mid[key] = (a + b) / 2;
    half[key] = (b - a) / 2 / scaleOf(key, mid[key]);
  }
  let segmentHalf = 0;
  plans.forEach((plan, i) => {
    segmentHalf = Math.max(segmentHalf, (hi[i].full - lo[i].full) / 2 / plan.duration, (hi[i].allBusy - lo[i].allBusy) / 2 / plan.duration);
    segmentHalf = Math.max(segmentHalf, (hi[i].busy - lo[i].busy) / 2 / plan.duration / Math.max(1, hi[i].busy / plan.duration));
    segmentHalf = Math.max(segmentHalf, (hi[i].orbit - lo[i].orbit) / 2 / plan.duration / Math.max(1, hi[i].orbit / plan.duration));
    segmentHalf = Math.max(segmentHalf, (hi[i].queue - lo[i].queue) / 2 / plan.duration / Math.max(1, hi[i].queue / plan.duration));
  });
  return { mid, half, segmentHalf };
}

export function periodicRetrialSystem(input: PeriodicRetrialInput): PeriodicRetrialResult {
  const v = parseInput(periodicRetrialInputSchema, input);
  const width = v.servers + v.waitingPositions + 1;
  const first = initialCap(v);
  let cap = first.cap;
  for (let attempt = 0; ; attempt++) {
    if ((cap + 1) * width > MAX_PERIODIC_RETRIAL_STATES) throw inputError("profile", `the orbit needs more than ${Math.floor(MAX_PERIODIC_RETRIAL_STATES / width) - 1} levels (${MAX_PERIODIC_RETRIAL_STATES} states): the peak keeps too many calls retrying`);
    const solved = solveWithCap(v, cap);
    if (first.dominatedTail !== undefined) return finish(v, solved, first.dominatedTail);
    // No dominating stable chain: check the periodic law's own tail at the cap, double if needed.
    if (solved.tail <= TRUNCATION_BOUND) return finish(v, solved, solved.tail);
    if (attempt >= 4) throw new TeletrafficConvergenceError(`the orbit tail at the cap (${solved.tail.toExponential(2)}) stays above ${TRUNCATION_BOUND} after 4 doublings`, attempt);
    cap *= 2;
  }
}

interface Solved {
  chain: Chain;
  plans: Plan[];
  mid: Measures;
  errorBound: number;
  segments: PeriodicRetrialSegment[];
  cycles: number;
  steps: number;
  /** Largest extrapolated orbit tail at the cap over every step of the last cycle (upper law). */
  tail: number;
}

function solveWithCap(v: Parsed, cap: number): Solved {
  const c = chainOf(v, cap);
  const plans: Plan[] = [];
  let start = 0;
  for (const s of v.profile) {
    plans.push(planSegment(c, start, s.duration, s.rate));
    start += s.duration;
  }
  const size = (c.kMax + 1) * (c.cap + 1);
  const rates = v.profile.map((s) => s.rate);
  // Bounding starts: the capped chain's equilibrium at the lowest and at the highest rate.
  const lowest = Math.min(...rates);
  const lower = lowest > 0 ? cappedStationaryLaw(stationaryModel(v, lowest), cap) : new Float64Array(size);
  if (!(lowest > 0)) lower[0] = 1; // no arrivals: the empty state
  const upper = cappedStationaryLaw(stationaryModel(v, Math.max(...rates)), cap);
  const scratch = (): Scratch => ({ v: new Float64Array(size), u: new Float64Array(size), out: new Float64Array(size), occupation: new Float64Array(size) });
  const sLo = scratch();
  const sHi = scratch();
  const perCycle = 2 * size * termsPerCycle(c, v.profile);
  const maxCycles = Math.max(3, Math.floor(MAX_PERIODIC_RETRIAL_WORK / perCycle));
  let steps = 0;
  let massLeft = 0;
  for (let cycles = 1; ; cycles++) {
    const a = runCycle(c, plans, lower, sLo);
    const b = runCycle(c, plans, upper, sHi, true);
    steps += a.steps + b.steps;
    massLeft += a.massLeft + b.massLeft;
    const { mid, half, segmentHalf } = intervals(c, plans, a.integrals, b.integrals);
    // The Poisson weights cut per step leave at most massLeft of probability (times the largest count for means).
    const numerical = massLeft * (c.kMax + c.cap + 1);
    const errorBound = Math.max(segmentHalf, ...Object.values(half)) + numerical;
    if (errorBound <= v.tolerance || cycles >= maxCycles) {
      if (errorBound > v.tolerance)
        throw new TeletrafficConvergenceError(
          `periodic retrial solution not within ${v.tolerance} after ${cycles} cycles (interval half-width ${errorBound.toExponential(2)}): the orbit relaxes too slowly over a cycle${
            peakStable(v, Math.max(...rates)) ? "" : " (persistence 1 with a peak above what the group clears: the upper bound starts from a full orbit, which drains only slowly)"
          }`,
          cycles,
        );
      const segments = plans.map((plan, i) => {
        const l = a.integrals[i];
        const h = b.integrals[i];
        const avg = (key: keyof Integrals) => (l[key] + h[key]) / 2 / plan.duration;
        return { start: plan.start, duration: plan.duration, rate: plan.rate, firstAttemptBlocking: avg("full"), timeCongestion: avg("allBusy"), carriedTraffic: avg("busy"), meanOrbit: avg("orbit"), meanQueueLength: avg("queue") };
      });
      const tail = b.tail;
      return { chain: c, plans, mid, errorBound, segments, cycles, steps, tail };
    }
  }
}

/** Extrapolated mass at and beyond the cap in a level-major law: the cap level plus the geometric tail beyond it (retrial-chain.ts). */
function extrapolatedCapTail(law: Float64Array, c: Chain): number {
  const level = (o: number) => levelMass(law, o, c.kMax + 1);
  return level(c.cap) + extrapolatedTail(level, c.cap);
}

function finish(v: Parsed, s: Solved, neglectedMass: number): PeriodicRetrialResult {
  const m = s.mid;
  const q = v.waitingPositions;
  return assertFiniteResult(
    {
      method: `${v.persistence > 0 ? "exact periodic retrial chain on (calls, orbit)" : "exact periodic chain on the calls present"}${q > 0 ? `, ${q} waiting positions${v.meanPatience !== undefined ? " with exponential patience" : ""}` : ""}: forward equations by uniformisation, bracketed between the laws from the lowest- and highest-rate equilibria (monotone chain)${v.persistence > 0 ? `; orbit capped at ${s.chain.cap}` : ""}`,
      servers: v.servers,
      waitingPositions: q,
      cycle: m.cycle,
      offeredTraffic: (m.fresh / m.cycle) * v.meanHolding,
      segments: s.segments,
      firstAttemptBlocking: m.firstAttemptBlocking,
      timeCongestion: m.timeCongestion,
      attemptCongestion: m.attemptCongestion,
      attemptsPerCall: m.attemptsPerCall,
      lossProbability: m.lossProbability,
      meanOrbit: m.meanOrbit,
      carriedTraffic: m.carriedTraffic,
      waitingProbability: m.waitingProbability,
      meanWait: m.meanWait,
      meanQueueLength: m.meanQueueLength,
      abandonmentProbability: m.abandonmentProbability,
      orbitCap: s.chain.cap,
      neglectedMass,
      errorBound: s.errorBound,
      tolerance: v.tolerance,
      states: (s.chain.kMax + 1) * (s.chain.cap + 1),
      cycles: s.cycles,
      steps: s.steps,
    },
    "periodicRetrialSystem",
  );
}
