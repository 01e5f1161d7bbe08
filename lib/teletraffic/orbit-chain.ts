import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput, TeletrafficConvergenceError } from "./errors";
import { batchMoments, batchSizeSchema, batchTail, type BatchSizeLaw } from "./laws";
import { mmppPhasesSchema, mmppShapeIsSquare } from "./mmpp";
import { phaseStationary } from "./qbd";
import { erlangBUnchecked } from "./erlang-b";
import { primaryEnvironment, primaryGroupsSchema, type PrimaryGroup } from "./overflow-chain";
import { extrapolatedTail, levelMass, retrialRateMeasures, TRUNCATION_BOUND, type RetrialRateMeasures } from "./retrial-chain";

/**
 * Exact retrial models whose fresh calls are not Poisson: Markov-modulated Poisson arrivals
 * (state: phase e, calls in the system k = 0..N+Q, calls in orbit o) and Poisson batches of any
 * size law (state: k, o; a batch refused in part sends each refused call to the orbit with the
 * persistence, so the orbit jumps by a binomial number). Retrying calls behave as in
 * retrial-chain.ts: each call in orbit retries at rate θ; a refused retry returns to the orbit with
 * the persistence p, else is lost; waiting calls abandon at rate α.
 *
 * Ordered level by level (orbit major), the generator is banded: orbit levels go down by at most
 * one, and up by at most the largest batch. The stationary law is found by the
 * Grassmann–Taksar–Heyman elimination (Grassmann, Taksar & Heyman 1985, Oper. Res. 33) restricted
 * to that band (eliminating from the last state keeps every fill-in inside it), so there is no
 * subtraction and the cost is states × lower band × upper band. The unbounded orbit is truncated at
 * a cap M chosen by doubling until the estimated mass beyond it, P(o = M) ρ/(1 − ρ) with ρ the
 * ratio of the last two level masses, is below TRUNCATION_BOUND; refusals that would take the orbit
 * above M are counted as lost. Geometric batch sizes are cut where their tail is below 1e-16, and
 * that tail is added to the reported neglected mass.
 */

/** Largest band storage (states × band width), about 80 MB. */
export const MAX_ORBIT_BAND = 10_000_000;
/**
 * states × lower band × upper band at the first orbit cap above which an evaluation is not
 * interactive: the doubling usually solves two or three caps, about 5 ns per unit, so about 100 ms.
 */
export const INTERACTIVE_ORBIT_WORK = 5_000_000;
/**
 * The same for overflow arrivals: the primaries change one group at a time, so most of the band
 * is zero and the elimination skips it; measured ad hoc at about 1 to 1.5 ns per unit with one
 * orbit doubling (a 20 000 000-unit case about 60 ms), hence a larger limit than for dense phases.
 */
export const INTERACTIVE_OVERFLOW_RETRIAL_WORK = 20_000_000;
const FIRST_CAP = 32;
const GEOMETRIC_CUT = 1e-16;

type Fresh =
  /** phase-modulated Poisson: arrival rate per phase, sparse phase changes [to, rate] per phase */
  | { kind: "mmpp"; rates: ArrayLike<number>; moves: Array<Array<[to: number, rate: number]>> }
  | { kind: "batch"; batchRate: number; sizes: Float64Array; allOrNothing: boolean; cutTail: number };

interface OrbitModel {
  servers: number;
  waitingPositions: number;
  mu: number;
  alpha: number;
  persistence: number;
  theta: number;
  fresh: Fresh;
}

export interface OrbitChainMeasures extends RetrialRateMeasures {
  states: number;
  orbitCap: number;
  /** estimated probability mass beyond the orbit cap (plus any cut batch-size tail) */
  neglectedMass: number;
  freshRate: number;
  /** share of batches with at least one call refused at the first attempt (batches only) */
  batchCongestion?: number;
  timeCongestion: number;
}

const phasesOf = (m: OrbitModel) => (m.fresh.kind === "mmpp" ? m.fresh.rates.length : 1);
const largestOf = (m: OrbitModel) => (m.fresh.kind === "batch" ? m.fresh.sizes.length - 1 : 1);

/** Band widths of the chain with the orbit capped at `cap` (orbit-major order, level size m). */
function bandOf(m: OrbitModel, cap: number): { states: number; lower: number; upper: number; width: number } {
  return bandOfShape(phasesOf(m), m.servers + m.waitingPositions, m.fresh.kind === "mmpp" ? undefined : largestOf(m), cap);
}

/** The same from the shape alone (phases, N + Q, largest batch or undefined for single arrivals), so sizes can be checked before a model is built. */
function bandOfShape(phases: number, k: number, largestBatch: number | undefined, cap: number): { states: number; lower: number; upper: number; width: number } {
  const level = phases * (k + 1);
  const states = (cap + 1) * level;
  const lower = Math.max(level, (phases - 1) * (k + 1));
  const upper = largestBatch === undefined ? level : Math.min(cap, largestBatch) * level + k;
  return { states, lower, upper, width: lower + upper + 1 };
}

/** Work of one solve at the first cap (states × lower × upper), for the interactive limit. */
function workAt(m: OrbitModel, cap: number): number {
  const b = bandOf(m, cap);
  return b.states * b.lower * b.upper;
}

/** Binomial(r, p) probabilities for r = 0..largest, row r at r × (largest + 1). */
function binomialTable(largest: number, p: number): Float64Array {
  const w = largest + 1;
  const t = new Float64Array(w * w);
  t[0] = 1;
  for (let r = 1; r <= largest; r++) for (let j = 0; j <= r; j++) t[r * w + j] = (j < r ? t[(r - 1) * w + j] * (1 - p) : 0) + (j > 0 ? t[(r - 1) * w + j - 1] * p : 0);
  return t;
}

/** Calls `visit(from, to, rate)` for every transition of the capped chain; refusals that would take the orbit above the cap land on it (the excess is lost). */
function forEachTransition(m: OrbitModel, cap: number, visit: (from: number, to: number, rate: number) => void): void {
  const n = m.servers;
  const kMax = n + m.waitingPositions;
  const phases = phasesOf(m);
  const level = phases * (kMax + 1);
  const index = (o: number, e: number, k: number) => o * level + e * (kMax + 1) + k;
  const p = m.persistence;
  const f = m.fresh;
  const binom = f.kind === "batch" ? binomialTable(f.sizes.length - 1, p) : undefined;
  for (let o = 0; o <= cap; o++)
    for (let e = 0; e < phases; e++)
      for (let k = 0; k <= kMax; k++) {
        const from = index(o, e, k);
        if (k > 0) visit(from, index(o, e, k - 1), Math.min(k, n) * m.mu + Math.max(0, k - n) * m.alpha);
        if (o > 0) {
          if (k < kMax) visit(from, index(o - 1, e, k + 1), o * m.theta);
          else if (p < 1) visit(from, index(o - 1, e, k), o * m.theta * (1 - p));
        }
        if (f.kind === "mmpp") {
          for (const [e2, rate] of f.moves[e]) visit(from, index(o, e2, k), rate);
          const lambda = f.rates[e];
          if (lambda > 0) {
            if (k < kMax) visit(from, index(o, e, k + 1), lambda);
            else if (p > 0 && o < cap) visit(from, index(o + 1, e, k), lambda * p);
          }
        } else {
          const w = f.sizes.length;
          for (let x = 1; x < w; x++) {
            const px = f.sizes[x];
            if (px === 0) continue;
            const room = kMax - k;
            const admitted = f.allOrNothing ? (x <= room ? x : 0) : Math.min(x, room);
            const refused = x - admitted;
            const rate = f.batchRate * px;
            for (let j = 0; j <= refused; j++) {
              const pj = binom![refused * w + j];
              if (pj === 0) continue;
              visit(from, index(Math.min(cap, o + j), 0, k + admitted), rate * pj);
            }
          }
        }
      }
}

/** Stationary law of the capped chain by banded GTH elimination. */
function solveCapped(m: OrbitModel, cap: number): Float64Array {
  const { states, lower, upper, width } = bandOf(m, cap);
  const q = new Float64Array(states * width);
  forEachTransition(m, cap, (from, to, rate) => {
    if (from === to) return;
    const d = to - from;
    if (d < -lower || d > upper) throw new Error("orbit chain: transition outside the band");
    q[from * width + d + lower] += rate;
  });
  const exit = new Float64Array(states);
  for (let nIdx = states - 1; nIdx >= 1; nIdx--) {
    const rowN = nIdx * width;
    const jLow = Math.max(0, nIdx - lower);
    let s = 0;
    for (let j = jLow; j < nIdx; j++) s += q[rowN + j - nIdx + lower];
    if (!(s > 0)) throw new Error("orbit chain: reducible (a state has no path down)");
    exit[nIdx] = s;
    for (let i = Math.max(0, nIdx - upper); i < nIdx; i++) {
      const a = q[i * width + nIdx - i + lower];
      if (a === 0) continue;
      const factor = a / s;
      const rowI = i * width - i + lower;
      for (let j = jLow; j < nIdx; j++) {
        if (j === i) continue;
        const b = q[rowN + j - nIdx + lower];
        if (b !== 0) q[rowI + j] += factor * b;
      }
    }
  }
  const pi = new Float64Array(states);
  pi[0] = 1;
  for (let nIdx = 1; nIdx < states; nIdx++) {
    let v = 0;
    for (let i = Math.max(0, nIdx - upper); i < nIdx; i++) v += pi[i] * q[i * width + nIdx - i + lower];
    v /= exit[nIdx];
    if (v > 1e250) {
      for (let i = 0; i < nIdx; i++) pi[i] *= 1e-250;
      v *= 1e-250;
    }
    pi[nIdx] = v;
  }
  let total = 0;
  for (let i = 0; i < states; i++) total += pi[i];
  for (let i = 0; i < states; i++) pi[i] /= total;
  return pi;
}

function measures(m: OrbitModel, pi: Float64Array, cap: number, neglectedMass: number): OrbitChainMeasures {
  const n = m.servers;
  const kMax = n + m.waitingPositions;
  const phases = phasesOf(m);
  const level = phases * (kMax + 1);
  const p = m.persistence;
  const f = m.fresh;
  let freshRate = 0;
  let freshRefused = 0;
  let batchesHit = 0;
  let batchRate = 0;
  let retryRate = 0;
  let retryRefused = 0;
  let lostAtCap = 0;
  let allBusy = 0;
  let meanOrbit = 0;
  let busy = 0;
  let queue = 0;
  let admitted = 0;
  let admittedToWait = 0;
  const w = f.kind === "batch" ? f.sizes.length : 0;
  const binom = f.kind === "batch" ? binomialTable(w - 1, p) : undefined;
  for (let o = 0; o <= cap; o++)
    for (let e = 0; e < phases; e++)
      for (let k = 0; k <= kMax; k++) {
        const x = pi[o * level + e * (kMax + 1) + k];
        if (x === 0) continue;
        const retries = o * m.theta * x;
        retryRate += retries;
        meanOrbit += o * x;
        busy += Math.min(k, n) * x;
        queue += Math.max(0, k - n) * x;
        if (k >= n) allBusy += x;
        if (k === kMax) retryRefused += retries;
        else {
          admitted += retries;
          if (k >= n) admittedToWait += retries;
        }
        if (f.kind === "mmpp") {
          const arrivals = f.rates[e] * x;
          freshRate += arrivals;
          if (k === kMax) {
            freshRefused += arrivals;
            if (o === cap) lostAtCap += p * arrivals;
          } else {
            admitted += arrivals;
            if (k >= n) admittedToWait += arrivals;
          }
        } else {
          batchRate += f.batchRate * x;
          const room = kMax - k;
          for (let size = 1; size < w; size++) {
            const px = f.sizes[size];
            if (px === 0) continue;
            const rate = f.batchRate * px * x;
            const taken = f.allOrNothing ? (size <= room ? size : 0) : Math.min(size, room);
            const refused = size - taken;
            freshRate += rate * size;
            freshRefused += rate * refused;
            admitted += rate * taken;
            // Admitted calls fill places k..k+taken−1; those at N or above wait.
            admittedToWait += rate * Math.max(0, k + taken - Math.max(k, n));
            if (refused > 0) {
              batchesHit += rate;
              for (let j = cap - o + 1; j <= refused; j++) lostAtCap += rate * binom![refused * w + j] * (o + j - cap);
            }
          }
        }
      }
  const abandonRate = m.alpha * queue;
  const lostRate = (1 - p) * (freshRefused + retryRefused) + lostAtCap + abandonRate;
  return {
    states: (cap + 1) * level,
    orbitCap: cap,
    neglectedMass,
    freshRate,
    ...(f.kind === "batch" ? { batchCongestion: batchesHit / batchRate } : {}),
    timeCongestion: allBusy,
    ...retrialRateMeasures({ freshRate, freshRefused, retryRate, retryRefused, lostRate, admitted, admittedToWait, abandonRate, meanOrbit, busy, queue }),
  };
}

function solveOrbitModel(m: OrbitModel): OrbitChainMeasures {
  const kMax = m.servers + m.waitingPositions;
  const level = phasesOf(m) * (kMax + 1);
  const cut = m.fresh.kind === "batch" ? m.fresh.cutTail : 0;
  if (m.persistence === 0) return measures(m, solveCapped(m, 0), 0, cut);
  let previous: { cap: number; neglected: number } | undefined;
  for (let cap = FIRST_CAP; ; cap *= 2) {
    const b = bandOf(m, cap);
    if (b.states * b.width > MAX_ORBIT_BAND) {
      // Say what happened: the tail was still too heavy at the last cap solved (if any), and the next cap does not fit.
      const tail = previous
        ? `at an orbit cap of ${previous.cap} calls ${Number.isFinite(previous.neglected) ? `the estimated mass beyond is still ${previous.neglected.toExponential(1)} (bound ${TRUNCATION_BOUND})` : "the orbit's law is not yet falling off"}, and a cap of ${cap}`
        : `already the first orbit cap (${cap} calls)`;
      throw new TeletrafficConvergenceError(
        `${tail} needs ${b.states * b.width} band entries, more than ${MAX_ORBIT_BAND} (persistence near 1 with the load near capacity, or a very long retry delay, keep many calls retrying)`,
        0,
      );
    }
    const pi = solveCapped(m, cap);
    const neglected = extrapolatedTail((o) => levelMass(pi, o, level), cap);
    if (neglected <= TRUNCATION_BOUND) return measures(m, pi, cap, neglected + cut);
    previous = { cap, neglected };
  }
}

const meanField = (what: string) => z.number().gt(0).max(1e12).describe(what);
const retrialFields = {
  servers: z.number().int().min(1).max(10_000).describe("integer number of servers N"),
  waitingPositions: z.number().int().min(0).max(10_000).default(0).describe("waiting positions Q (FIFO), default 0"),
  persistence: z.number().min(0).max(1).describe("probability that a refused call tries again (after every refusal), 0..1"),
  meanRetryDelay: meanField("mean exponential delay before a repeated attempt"),
  meanHolding: meanField("mean exponential holding time, default 1").default(1),
  meanPatience: meanField("mean exponential patience of a waiting call; default: waits for ever").optional(),
};

function checkCommon(v: { meanPatience?: number; waitingPositions: number }, ctx: z.RefinementCtx): void {
  if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
}

function checkSize(m: OrbitModel, ctx: z.RefinementCtx): void {
  checkShape(phasesOf(m), m.servers + m.waitingPositions, m.fresh.kind === "mmpp" ? undefined : largestOf(m), m.persistence, ctx);
}

function checkShape(phases: number, k: number, largestBatch: number | undefined, persistence: number, ctx: z.RefinementCtx): void {
  const b = bandOfShape(phases, k, largestBatch, persistence > 0 ? FIRST_CAP : 0);
  if (b.states * b.width > MAX_ORBIT_BAND)
    ctx.addIssue({ code: "custom", path: ["servers"], message: `the chain needs ${b.states * b.width} band entries at its first orbit cap, more than ${MAX_ORBIT_BAND}` });
}

export const mmppRetrialInputSchema = z
  .object({ ...retrialFields, ...mmppPhasesSchema.shape })
  .superRefine((v, ctx) => {
    checkCommon(v, ctx);
    if (mmppShapeIsSquare(v, ctx)) checkSize(mmppModelOf(v), ctx);
  })
  .describe(`retrials on Markov-modulated Poisson arrivals: exact chain on (phase, calls in the system, calls in orbit), orbit truncated with a stated bound. ${WAITING_MEASURES}`);
export type MmppRetrialInput = z.input<typeof mmppRetrialInputSchema>;

export const batchRetrialInputSchema = z
  .object({
    ...retrialFields,
    traffic: z.number().gt(0).max(1e6).describe("fresh offered traffic in erlangs counted per call: batch rate × mean batch size × mean holding"),
    batchSize: batchSizeSchema.describe("batch-size law: geometric {mean}, fixed {value}, uniform {min, max}, empirical {values, probabilities}"),
    admission: z.enum(["partial", "all-or-nothing"]).describe('"partial": admit as many calls as there is room for; "all-or-nothing": refuse the whole batch if it does not fit'),
  })
  .superRefine((v, ctx) => {
    checkCommon(v, ctx);
    checkSize(batchModelOf(v), ctx);
  })
  .describe(`retrials on Poisson batches of any size law: exact chain on (calls in the system, calls in orbit), each refused call of a batch retrying with the persistence. ${WAITING_MEASURES}`);
export type BatchRetrialInput = z.input<typeof batchRetrialInputSchema>;

export const overflowRetrialInputSchema = z
  .object({ ...retrialFields, primaries: primaryGroupsSchema })
  .superRefine((v, ctx) => {
    checkCommon(v, ctx);
    // Checked from the shape: the product of primary states can be astronomically large.
    checkShape(primaryStates(v.primaries), v.servers + v.waitingPositions, undefined, v.persistence, ctx);
  })
  .describe(
    `retrials on overflow arrivals: primary groups with own Poisson traffic overflow to a final group of N servers (optional waiting room and patience), whose refused calls retry there; exact chain on (primary states, calls at the final group, calls in orbit). ${WAITING_MEASURES}`,
  );
export type OverflowRetrialInput = z.input<typeof overflowRetrialInputSchema>;

type Common = { servers: number; waitingPositions: number; persistence: number; meanRetryDelay: number; meanHolding: number; meanPatience?: number };

function common(v: Common): Omit<OrbitModel, "fresh"> {
  return {
    servers: v.servers,
    waitingPositions: v.waitingPositions,
    mu: 1 / v.meanHolding,
    alpha: v.meanPatience !== undefined ? 1 / v.meanPatience : 0,
    persistence: v.persistence,
    theta: 1 / v.meanRetryDelay,
  };
}

function mmppModelOf(v: Common & { rates: number[]; switching: number[][] }): OrbitModel {
  const moves = v.switching.map((row, e) => row.flatMap((rate, e2): Array<[number, number]> => (e2 !== e && rate > 0 ? [[e2, rate]] : [])));
  return { ...common(v), fresh: { kind: "mmpp", rates: v.rates, moves } };
}

/**
 * Overflow arrivals: the primary groups (own Poisson traffic, exponential holding with the same
 * mean as the final group) are the phase process, and the overflow rate in a phase is the traffic
 * of the primaries that are full. Refused calls retry at the final group only, as the engine does.
 */
function overflowModelOf(v: Common & { primaries: PrimaryGroup[] }): OrbitModel {
  const env = primaryEnvironment(v.primaries);
  const mu = 1 / v.meanHolding;
  const moves: Array<Array<[number, number]>> = Array.from({ length: env.phases }, () => []);
  for (const [from, to, rate] of env.edges) moves[from].push([to, rate * mu]);
  return { ...common(v), fresh: { kind: "mmpp", rates: env.up.map((r) => r * mu), moves } };
}

const primaryStates = (primaries: readonly PrimaryGroup[]) => primaries.reduce((k, p) => k * (p.servers + 1), 1);

/** Batch-size probabilities P(X = x), x = 1..largest (geometric cut where its tail is below 1e-16). */
function sizesOf(law: BatchSizeLaw): { sizes: Float64Array; cutTail: number } {
  if (law.law === "geometric") {
    const q = 1 - 1 / law.mean;
    const largest = q === 0 ? 1 : Math.max(1, Math.ceil(Math.log(GEOMETRIC_CUT) / Math.log(q)));
    const sizes = new Float64Array(largest + 1);
    for (let x = 1; x <= largest; x++) sizes[x] = (1 - q) * q ** (x - 1);
    return { sizes, cutTail: q ** largest };
  }
  const probe = batchTail(law, 1);
  const { tail } = batchTail(law, probe.largest);
  const sizes = new Float64Array(probe.largest + 1);
  for (let x = 1; x <= probe.largest; x++) sizes[x] = tail[x - 1] - tail[x];
  return { sizes, cutTail: 0 };
}

function batchModelOf(v: Common & { traffic: number; batchSize: BatchSizeLaw; admission: "partial" | "all-or-nothing" }): OrbitModel {
  const { sizes, cutTail } = sizesOf(v.batchSize);
  const batchRate = v.traffic / (batchMoments(v.batchSize).m1 * v.meanHolding);
  return { ...common(v), fresh: { kind: "batch", batchRate, sizes, allOrNothing: v.admission === "all-or-nothing", cutTail } };
}

export interface OrbitChainResult extends OrbitChainMeasures {
  method: string;
  servers: number;
  waitingPositions: number;
  persistence: number;
  offeredTraffic: number;
  /** true when the evaluation exceeds the interactive size (callers offer a background job) */
  large: boolean;
}

/** Work units of the solve at its first orbit cap (states × lower band × upper band). */
export function mmppRetrialWork(v: Common & { rates: number[]; switching: number[][] }): number {
  const m = mmppModelOf(v);
  return workAt(m, m.persistence > 0 ? FIRST_CAP : 0);
}
export function batchRetrialWork(v: Common & { traffic: number; batchSize: BatchSizeLaw; admission: "partial" | "all-or-nothing" }): number {
  const m = batchModelOf(v);
  return workAt(m, m.persistence > 0 ? FIRST_CAP : 0);
}

/** Work units as for the other chains, from the shape alone (no environment is built). */
export function overflowRetrialWork(v: { servers: number; waitingPositions: number; persistence: number; primaries: readonly PrimaryGroup[] }): number {
  const b = bandOfShape(primaryStates(v.primaries), v.servers + v.waitingPositions, undefined, v.persistence > 0 ? FIRST_CAP : 0);
  return b.states * b.lower * b.upper;
}

/** `offered`: the offered traffic from the inputs (given, or from the phase law), echoed instead of Σ rate × π and its rounding. */
function finish(m: OrbitModel, what: string, v: Common, offered: number, interactiveWork = INTERACTIVE_ORBIT_WORK): OrbitChainResult {
  const r = solveOrbitModel(m);
  const truncation = r.neglectedMass > 0 ? `; orbit truncated at ${r.orbitCap} calls, estimated neglected mass ${r.neglectedMass.toExponential(1)} (bound ${TRUNCATION_BOUND})` : "";
  return assertFiniteResult(
    {
      method: `${what}, exact chain solved by banded GTH elimination (${r.states} states${truncation})`,
      servers: v.servers,
      waitingPositions: v.waitingPositions,
      persistence: v.persistence,
      large: workAt(m, m.persistence > 0 ? FIRST_CAP : 0) > interactiveWork,
      ...r,
      offeredTraffic: offered,
      freshRate: offered / v.meanHolding,
    },
    "orbitChain",
  );
}

function checkStable(v: Common, traffic: number): void {
  if (v.persistence === 1 && v.meanPatience === undefined && traffic >= v.servers)
    throw inputError("persistence", `with persistence 1 the orbit is stable only for offered traffic below the number of servers (${v.servers})`);
}

/** Retrials on MMPP fresh calls (Falin & Templeton 1997, "Retrial Queues", the retrial queue in a random environment). */
export function mmppRetrialSystem(input: MmppRetrialInput): OrbitChainResult {
  const v = parseInput(mmppRetrialInputSchema, input);
  const k = v.rates.length;
  const phaseRates = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) phaseRates[i * k + l] = i === l ? 0 : v.switching[i][l];
  const phase = phaseStationary(phaseRates, k);
  if (!phase) throw inputError("switching", "the phase process must be irreducible (every phase reachable from every other)");
  const meanRate = v.rates.reduce((s, r, i) => s + r * phase[i], 0);
  if (!(meanRate > 0)) throw inputError("rates", "at least one phase needs a rate > 0");
  checkStable(v, meanRate * v.meanHolding);
  return finish(mmppModelOf(v), "retrials on MMPP arrivals", v, meanRate * v.meanHolding);
}

/** Retrials on Poisson batches (each refused call of a batch joins the orbit with the persistence). */
export function batchRetrialSystem(input: BatchRetrialInput): OrbitChainResult {
  const v = parseInput(batchRetrialInputSchema, input);
  checkStable(v, v.traffic);
  const m = batchModelOf(v);
  if (m.fresh.kind === "batch" && m.fresh.allOrNothing) {
    let smallest = 1;
    while (m.fresh.sizes[smallest] === 0) smallest++;
    if (smallest > v.servers + v.waitingPositions) throw inputError("batchSize", `every batch is larger than servers + waitingPositions (${v.servers + v.waitingPositions}) and is always refused`);
  }
  return finish(m, `retrials on Poisson batches (${v.batchSize.law} sizes, ${v.admission})`, v, v.traffic);
}

/**
 * Retrials on overflow traffic (the overflow network of overflow-chain.ts with an orbit at the
 * final group): the MMPP retrial chain with the joint primary state as the phase (Falin &
 * Templeton 1997, the retrial queue in a random environment). Offered traffic is the overflow traffic.
 */
export function overflowRetrialSystem(input: OverflowRetrialInput): OrbitChainResult {
  const v = parseInput(overflowRetrialInputSchema, input);
  // Independent primaries: the overflow traffic is Σ Aᵢ B(nᵢ, Aᵢ).
  const overflow = v.primaries.reduce((s, p) => s + p.traffic * erlangBUnchecked(p.servers, p.traffic), 0);
  if (!(overflow > 1e-280)) throw inputError("primaries", `no traffic overflows to the final group (overflow ${overflow} erlangs is below the float range)`);
  checkStable(v, overflow);
  return finish(overflowModelOf(v), `retrials on overflow from ${v.primaries.length} primary group${v.primaries.length > 1 ? "s" : ""}`, v, overflow, INTERACTIVE_OVERFLOW_RETRIAL_WORK);
}
