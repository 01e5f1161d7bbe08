import { inputError, TeletrafficConvergenceError } from "./errors";
import { departureRate } from "./departures";

/**
 * Exact Markov model of a group with N servers, Q waiting positions (FIFO, exponential patience of
 * rate α while waiting), exponential holding, Poisson or finite-source fresh calls, and an orbit of
 * refused calls: after each refusal a call retries with probability p (persistence) after an
 * exponential delay of rate θ per call in orbit, else it is lost. Abandoning calls are lost.
 *
 * State (k, o): k = calls in the system (0..K, K = N + Q), o = calls in orbit. Orbit levels change
 * only by one, and the orbit grows only from k = K, so the up-blocks have rank one. Linear level
 * reduction (Gaver, Jacobs & Latouche 1984) from the top level down: R_o = A0 M_o^{-1} has a single
 * nonzero row, and M_o is tridiagonal plus one dense row, factored in O(K) per level without
 * subtraction (its row sums are known exactly: oθ for k < K and oθ(1 − p) for k = K, as in GTH,
 * Grassmann, Taksar & Heyman 1985). Total O(levels × K) time and memory.
 *
 * An unbounded orbit (Poisson fresh calls, p > 0) is truncated at a cap M chosen by doubling until
 * the estimated probability beyond it, P(o = M) ρ / (1 − ρ) with ρ = P(o = M) / P(o = M − 1), is
 * below TRUNCATION_BOUND; refusals at the cap are counted as lost. The estimate is reported.
 */
export interface MarkovSystemModel {
  servers: number;
  waitingPositions: number;
  meanHolding: number;
  /** 1 / mean patience; 0 = callers wait for ever */
  patienceRate: number;
  arrivals: { kind: "poisson"; rate: number } | { kind: "finite-source"; sources: number; idleRate: number };
  persistence: number;
  /** 1 / mean retry delay (per call in orbit); used when persistence > 0 */
  retryRate: number;
}

export interface MarkovSystemMeasures {
  /** states solved (levels × (K + 1)) */
  states: number;
  /** largest orbit size in the solved chain */
  orbitCap: number;
  /** estimated probability mass beyond the orbit cap (0 when the orbit is bounded by the sources) */
  neglectedMass: number;
  freshRate: number;
  /** share of fresh calls whose first attempt is refused (no server, no waiting position) */
  firstAttemptBlocking: number;
  /** fraction of time all N servers are busy */
  timeCongestion: number;
  /** fraction of time servers and waiting positions are all taken (N + Q calls in the system; 0 when fewer sources than N + Q) */
  fullCongestion: number;
  /** finite sources only: fraction of time no source is idle (all S in the system or in orbit), so no fresh call can arrive */
  allSourcesBusy?: number;
  /** refused attempts / all attempts */
  attemptCongestion: number;
  attemptsPerCall: number;
  /** share of fresh calls that end without service (refused for good, or abandoned) */
  lossProbability: number;
  meanOrbit: number;
  carriedTraffic: number;
  /** share of admitted attempts that wait */
  waitingProbability: number;
  /** mean wait of admitted attempts (0 for those served at once; abandoning ones up to abandonment) */
  meanWait: number;
  meanQueueLength: number;
  /** share of admitted attempts that abandon */
  abandonmentProbability: number;
}

/** The measures every retrial chain reports, from its stationary flows (shared by orbit-chain.ts and renewal-retrial.ts). */
export type RetrialRateMeasures = Pick<
  MarkovSystemMeasures,
  | "firstAttemptBlocking"
  | "attemptCongestion"
  | "attemptsPerCall"
  | "lossProbability"
  | "meanOrbit"
  | "carriedTraffic"
  | "waitingProbability"
  | "meanWait"
  | "meanQueueLength"
  | "abandonmentProbability"
>;

/**
 * Measures from flows (rates per unit time) of a retrial chain in equilibrium: fresh and retry
 * attempts and those refused, calls lost for good, attempts admitted (and of them, to wait), and
 * the time averages of orbit, busy servers and queue. Waits by Little's law over admitted attempts.
 */
export function retrialRateMeasures(f: {
  freshRate: number;
  freshRefused: number;
  retryRate: number;
  retryRefused: number;
  lostRate: number;
  admitted: number;
  admittedToWait: number;
  abandonRate: number;
  meanOrbit: number;
  busy: number;
  queue: number;
}): RetrialRateMeasures {
  return {
    firstAttemptBlocking: f.freshRefused / f.freshRate,
    attemptCongestion: (f.freshRefused + f.retryRefused) / (f.freshRate + f.retryRate),
    attemptsPerCall: (f.freshRate + f.retryRate) / f.freshRate,
    lossProbability: Math.min(1, f.lostRate / f.freshRate),
    meanOrbit: f.meanOrbit,
    carriedTraffic: f.busy,
    waitingProbability: f.admitted > 0 ? f.admittedToWait / f.admitted : 0,
    meanWait: f.admitted > 0 ? f.queue / f.admitted : 0,
    meanQueueLength: f.queue,
    abandonmentProbability: f.admitted > 0 ? f.abandonRate / f.admitted : 0,
  };
}

export const TRUNCATION_BOUND = 1e-12;

/**
 * Estimated probability mass beyond an orbit cap from the masses of the last two orbit levels:
 * a geometric tail P(o = M) ρ/(1 − ρ), ρ = P(o = M)/P(o = M − 1); Infinity when ρ is near 1.
 */
export function extrapolatedTail(level: (o: number) => number, cap: number): number {
  const top = level(cap);
  const below = level(cap - 1);
  const rho = below > 0 ? top / below : 1;
  return top === 0 ? 0 : rho < 0.99 ? (top * rho) / (1 - rho) : Infinity;
}
/** Largest chain (levels × (K + 1)) solved at all: memory for the R rows (8 bytes each). */
export const MAX_MARKOV_STATES = 5_000_000;
/** Above this many states an evaluation is no longer interactive (about 100 ms). */
export const INTERACTIVE_MARKOV_STATES = 1_000_000;

/** Largest number of calls in the system: N + Q, or the number of sources if smaller. */
function capacityOf(model: MarkovSystemModel): number {
  const k = model.servers + model.waitingPositions;
  return model.arrivals.kind === "finite-source" ? Math.min(k, model.arrivals.sources) : k;
}

/** Fresh-call rate in state (k, o). */
function freshRateOf(model: MarkovSystemModel): (k: number, o: number) => number {
  const a = model.arrivals;
  if (a.kind === "poisson") return () => a.rate;
  return (k, o) => Math.max(0, a.sources - k - o) * a.idleRate;
}

/** Solves the chain with the orbit capped at `cap`; returns π (level-major) and per-level log scales folded in. */
function solveCapped(model: MarkovSystemModel, cap: number): Float64Array {
  const n = model.servers;
  const kMax = capacityOf(model);
  const width = kMax + 1;
  const mu = 1 / model.meanHolding;
  const alpha = model.patienceRate;
  const p = model.persistence;
  const theta = model.retryRate;
  const fresh = freshRateOf(model);
  const death = (k: number) => departureRate(k, n, mu, alpha);

  const r = new Float64Array((cap + 1) * width); // row K of R_o, o = 1..cap
  const c = new Float64Array(width); // r_{o+1} A2(o+1): the dense row added to row K of M_o
  const sup = new Float64Array(width);
  const rowK = new Float64Array(width);
  const slack = new Float64Array(width);
  const mSub = new Float64Array(width); // multiplier of row k+1 by pivot k (stored at k+1)
  const mK = new Float64Array(width); // multiplier of row K by pivot k
  const pivot = new Float64Array(width);

  /** Factors M_o (or the level-0 generator) into pivot/mSub/mK; sup and rowK are consumed. */
  const factor = (o: number) => {
    for (let k = 0; k < width; k++) {
      sup[k] = k < kMax ? fresh(k, o) : 0;
      slack[k] = k < kMax ? o * theta : o * theta * (1 - p);
      rowK[k] = c[k];
    }
    if (kMax > 0) rowK[kMax - 1] += death(kMax);
    for (let q = 0; q < kMax; q++) {
      const pv = slack[q] + sup[q];
      if (!(pv > 0)) throw new Error("markov system: singular level matrix");
      pivot[q] = pv;
      if (q + 1 < kMax) {
        const m = death(q + 1) / pv;
        mSub[q + 1] = m;
        slack[q + 1] += m * slack[q];
        // row q+1 gains m × (row q) at column q+1: its own diagonal, not stored
      }
      const mk = rowK[q] / pv;
      mK[q] = mk;
      slack[kMax] += mk * slack[q];
      if (q + 1 < kMax) rowK[q + 1] += mk * sup[q];
    }
    pivot[kMax] = slack[kMax];
  };

  /** y with y M = b e_K (b > 0) or, for the level-0 generator, y_K = 1: back substitution, additions only. */
  const solveRowK = (yK: number, out: Float64Array, offset: number) => {
    out[offset + kMax] = yK;
    let next = yK;
    let head = yK; // y_K as currently scaled
    for (let i = kMax - 1; i >= 0; i--) {
      let v = (i + 1 < kMax ? next * mSub[i + 1] : 0) + head * mK[i];
      if (v > 1e250) {
        // Only the level-0 solve (y_K = 1, relative to the full state) can grow this far: the
        // entries of R are bounded by λp / (oθ). Rescale what is done; the caller normalises.
        for (let l = i + 1; l <= kMax; l++) out[offset + l] *= 1e-250;
        head *= 1e-250;
        v *= 1e-250;
      }
      out[offset + i] = v;
      next = v;
    }
  };

  for (let o = cap; o >= 1; o--) {
    c.fill(0);
    if (o < cap) {
      const base = (o + 1) * width;
      const down = (o + 1) * theta;
      for (let k = 0; k < kMax; k++) c[k + 1] += r[base + k] * down;
      // c[K] += r[K] (o+1) θ (1 − p) lies on the diagonal: accounted for by the exact slack
    }
    factor(o);
    const up = p * fresh(kMax, o - 1);
    solveRowK(up / pivot[kMax], r, o * width);
  }
  c.fill(0);
  if (cap >= 1) {
    const down = theta;
    for (let k = 0; k < kMax; k++) c[k + 1] += r[width + k] * down;
  }
  factor(0);
  const pi = new Float64Array((cap + 1) * width);
  solveRowK(1, pi, 0);
  // π_o = π_{o-1}[K] r_o, rescaled per level with the log scale kept
  const logScale = new Float64Array(cap + 1);
  const normalise = (o: number) => {
    let s = 0;
    for (let k = 0; k < width; k++) s += pi[o * width + k];
    if (s > 0) for (let k = 0; k < width; k++) pi[o * width + k] /= s;
    return s;
  };
  logScale[0] = Math.log(normalise(0));
  let last = cap;
  for (let o = 1; o <= cap; o++) {
    const head = pi[(o - 1) * width + kMax];
    if (!(head > 0)) {
      last = o - 1;
      break;
    }
    for (let k = 0; k < width; k++) pi[o * width + k] = head * r[o * width + k];
    const s = normalise(o);
    logScale[o] = logScale[o - 1] + Math.log(s);
  }
  let maxLog = -Infinity;
  for (let o = 0; o <= last; o++) maxLog = Math.max(maxLog, logScale[o]);
  let total = 0;
  for (let o = 0; o <= last; o++) total += Math.exp(logScale[o] - maxLog);
  for (let o = 0; o <= cap; o++) {
    const w = o <= last ? Math.exp(logScale[o] - maxLog) / total : 0;
    for (let k = 0; k < width; k++) pi[o * width + k] *= w;
  }
  return pi;
}

function measures(model: MarkovSystemModel, pi: Float64Array, cap: number, neglectedMass: number): MarkovSystemMeasures {
  const n = model.servers;
  const kMax = capacityOf(model);
  const width = kMax + 1;
  const fresh = freshRateOf(model);
  const p = model.persistence;
  const theta = model.persistence > 0 ? model.retryRate : 0;
  let freshRate = 0;
  let freshRefused = 0;
  let retryRate = 0;
  let retryRefused = 0;
  let timeCongestion = 0;
  let full = 0;
  let allSourcesBusy = 0;
  const sources = model.arrivals.kind === "finite-source" ? model.arrivals.sources : undefined;
  // k = kMax is "full" only when kMax = N + Q; with fewer sources it is the state where all of them are in the system
  const fillable = kMax === n + model.waitingPositions;
  let meanOrbit = 0;
  let busy = 0;
  let queue = 0;
  let admitted = 0;
  let admittedToWait = 0;
  let lostAtCap = 0;
  for (let o = 0; o <= cap; o++) {
    for (let k = 0; k <= kMax; k++) {
      const x = pi[o * width + k];
      if (x === 0) continue;
      const f = fresh(k, o) * x;
      const rt = o * theta * x;
      freshRate += f;
      retryRate += rt;
      meanOrbit += o * x;
      busy += Math.min(k, n) * x;
      queue += Math.max(0, k - n) * x;
      if (k >= n) timeCongestion += x;
      if (sources !== undefined && k + o === sources) allSourcesBusy += x;
      if (k === kMax) {
        if (fillable) full += x;
        freshRefused += f;
        retryRefused += rt;
        if (o === cap && p > 0) lostAtCap += p * f;
      } else {
        admitted += f + rt;
        if (k >= n) admittedToWait += f + rt;
      }
    }
  }
  const abandonRate = model.patienceRate * queue;
  const lostRate = (1 - p) * (freshRefused + retryRefused) + lostAtCap + abandonRate;
  return {
    states: (cap + 1) * width,
    orbitCap: cap,
    neglectedMass,
    freshRate,
    timeCongestion,
    fullCongestion: full,
    ...(sources !== undefined ? { allSourcesBusy } : {}),
    ...retrialRateMeasures({ freshRate, freshRefused, retryRate, retryRefused, lostRate, admitted, admittedToWait, abandonRate, meanOrbit, busy, queue }),
  };
}

/** Probability of orbit level o in a level-major law with `width` states per level. */
export function levelMass(pi: Float64Array, o: number, width: number): number {
  let s = 0;
  for (let k = 0; k < width; k++) s += pi[o * width + k];
  return s;
}

/** Orbit levels the model can reach without a cap, or undefined when the orbit is unbounded. */
function boundedOrbit(model: MarkovSystemModel): number | undefined {
  if (model.persistence === 0) return 0;
  const a = model.arrivals;
  if (a.kind === "finite-source") return Math.max(0, a.sources - capacityOf(model));
  return undefined;
}

/** Number of states the solve will need before it starts (bounded orbit) or at its first cap. */
export function markovSystemStates(model: MarkovSystemModel, cap = 64): number {
  return ((boundedOrbit(model) ?? cap) + 1) * (capacityOf(model) + 1);
}

export function solveMarkovSystem(model: MarkovSystemModel, maxStates = MAX_MARKOV_STATES): MarkovSystemMeasures {
  const { pi, cap, neglected } = solveWithCap(model, maxStates);
  return measures(model, pi, cap, neglected);
}

/** The stationary law (level-major, orbit capped where the neglected mass is below TRUNCATION_BOUND), its cap and the estimated mass beyond. */
function solveWithCap(model: MarkovSystemModel, maxStates: number): { pi: Float64Array; cap: number; neglected: number } {
  const width = capacityOf(model) + 1;
  const bounded = boundedOrbit(model);
  if (bounded !== undefined) {
    if ((bounded + 1) * width > maxStates) throw inputError("sources", `the chain has ${(bounded + 1) * width} states, more than ${maxStates}`);
    return { pi: solveCapped(model, bounded), cap: bounded, neglected: 0 };
  }
  let cap = 64;
  for (;;) {
    if ((cap + 1) * width > maxStates) {
      throw new TeletrafficConvergenceError(
        `the orbit of retrying calls does not settle below ${Math.floor(maxStates / width) - 1} calls within ${maxStates} states (persistence near 1 with the load near capacity, or a very long retry delay)`,
        0,
      );
    }
    const pi = solveCapped(model, cap);
    const neglected = extrapolatedTail((o) => levelMass(pi, o, width), cap);
    if (neglected <= TRUNCATION_BOUND) return { pi, cap, neglected };
    cap *= 2;
  }
}

/**
 * The smallest orbit cap M at which the stationary chain leaves at most `bound` (estimated) mass at
 * or beyond M: P(o >= M) from the solved levels plus the extrapolated tail beyond the solve's cap.
 */
export function stationaryOrbitCap(model: MarkovSystemModel, bound = TRUNCATION_BOUND, maxStates = MAX_MARKOV_STATES): { cap: number; tail: number } {
  const { pi, cap, neglected } = solveWithCap(model, maxStates);
  const width = capacityOf(model) + 1;
  let tail = neglected;
  for (let o = cap; o >= 1; o--) {
    const next = tail + levelMass(pi, o, width);
    if (next > bound) return { cap: o + 1, tail };
    tail = next;
  }
  return { cap: 1, tail };
}

/** Stationary law of the chain with the orbit capped at `cap` (refusals at the cap lost), level-major: index o (K + 1) + k. */
export function cappedStationaryLaw(model: MarkovSystemModel, cap: number): Float64Array {
  return solveCapped(model, cap);
}
