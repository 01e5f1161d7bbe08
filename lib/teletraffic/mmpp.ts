import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { phaseStationary, solveEnvironmentLossChain } from "./qbd";

export const MAX_MMPP_STATES = 200_000;
/** The simulation engine's limit too (scenario LIMITS.phases). */
export const MAX_MMPP_PHASES = 16;
/** (N + 1) × phases³ above which an evaluation is no longer interactive (about 100 ms). */
export const INTERACTIVE_MMPP_WORK = 10_000_000;

/** Phase rates and switching matrix of an MMPP (shape checked by the operations that use it). */
export const mmppPhasesSchema = z.object({
  rates: z.array(z.number().min(0).max(1e9)).min(1).max(MAX_MMPP_PHASES).describe(`Poisson arrival rate in each phase (1 to ${MAX_MMPP_PHASES} phases; on-off is [onRate, 0])`),
  switching: z
    .array(z.array(z.number().min(0).max(1e9)))
    .describe("switching[i][j] = rate of changing from phase i to phase j (diagonal ignored); must be irreducible"),
});

/** Adds an issue and returns false unless switching is k × k for k rates. */
export function mmppShapeIsSquare(v: { rates: number[]; switching: number[][] }, ctx: z.RefinementCtx): boolean {
  const k = v.rates.length;
  if (v.switching.length === k && v.switching.every((row) => row.length === k)) return true;
  ctx.addIssue({ code: "custom", path: ["switching"], message: `must be a ${k}×${k} matrix (one row and column per phase)` });
  return false;
}

export const mmppLossInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_MMPP_STATES - 1).describe(`integer number of servers N; phases × (N + 1) <= ${MAX_MMPP_STATES}`),
    ...mmppPhasesSchema.shape,
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1"),
  })
  .superRefine((v, ctx) => {
    const k = v.rates.length;
    if (!mmppShapeIsSquare(v, ctx)) return;
    if (k * (v.servers + 1) > MAX_MMPP_STATES) {
      ctx.addIssue({ code: "custom", path: ["servers"], message: `phases × (N + 1) = ${k * (v.servers + 1)} exceeds ${MAX_MMPP_STATES} states` });
    }
  })
  .describe("MMPP/M/N/N: Markov-modulated Poisson arrivals, exponential holding, blocked calls lost");
export type MmppLossInput = z.input<typeof mmppLossInputSchema>;

export interface MmppLossResult {
  method: string;
  servers: number;
  phases: number;
  meanArrivalRate: number;
  offeredTraffic: number;
  /** fraction of time all N servers are busy */
  timeCongestion: number;
  /** fraction of arriving calls that find all N servers busy (arrival-weighted) */
  callCongestion: number;
  carriedTraffic: number;
  lostTraffic: number;
  phaseProbabilities: number[];
  meanBusy: number;
}

/** Exact CTMC of MMPP/M/N/N, solved by linear level reduction (see qbd.ts). */
export function mmppLossSystem(input: MmppLossInput): MmppLossResult {
  const { servers: n, rates, switching, meanHolding } = parseInput(mmppLossInputSchema, input);
  const k = rates.length;
  const phaseRates = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) phaseRates[i * k + l] = i === l ? 0 : switching[i][l];
  const theta = phaseStationary(phaseRates, k);
  if (!theta) throw inputError("switching", "the phase process must be irreducible (every phase reachable from every other)");
  const up = Float64Array.from(rates);
  const meanArrivalRate = rates.reduce((s, rate, i) => s + rate * theta[i], 0);
  const offeredTraffic = meanArrivalRate * meanHolding;
  // no arrivals: the chain stays at level 0, which is the full level when N = 0 (as B(0, 0) = 1)
  let timeCongestion = n === 0 ? 1 : 0;
  let callCongestion = n === 0 ? 1 : 0;
  let meanBusy = 0;
  let admittedRate = 0;
  if (meanArrivalRate > 0) {
    const pi = solveEnvironmentLossChain(n, k, phaseRates, up, 1 / meanHolding);
    timeCongestion = 0;
    callCongestion = 0;
    let blockedArrivals = 0;
    for (let i = 0; i < k; i++) {
      timeCongestion += pi[n * k + i];
      blockedArrivals += rates[i] * pi[n * k + i];
    }
    for (let j = 0; j <= n; j++) for (let i = 0; i < k; i++) meanBusy += j * pi[j * k + i];
    for (let j = 0; j < n; j++) for (let i = 0; i < k; i++) admittedRate += rates[i] * pi[j * k + i];
    callCongestion = blockedArrivals / meanArrivalRate;
  }
  return assertFiniteResult(
    {
      method: "MMPP/M/N/N exact CTMC, block-tridiagonal level reduction",
      servers: n,
      phases: k,
      meanArrivalRate,
      offeredTraffic,
      timeCongestion,
      callCongestion,
      // Why the sum of admitted arrivals, not offered (1 − call congestion): with the call congestion
      // near 1 that difference cancelled (N = 49 999, h = 1e12 gave carried 50 144 > N servers)
      carriedTraffic: admittedRate * meanHolding,
      lostTraffic: offeredTraffic * callCongestion,
      phaseProbabilities: Array.from(theta),
      meanBusy,
    },
    "mmppLossSystem",
  );
}

export const mmppQueueInputSchema = z
  .object({
    servers: z.number().int().min(1).max(MAX_MMPP_STATES - 1).describe("integer number of servers N"),
    waitingPositions: z.number().int().min(1).max(MAX_MMPP_STATES - 1).describe(`waiting positions Q (FIFO); phases × (N + Q + 1) <= ${MAX_MMPP_STATES}`),
    ...mmppPhasesSchema.shape,
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1"),
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a waiting call; default: waits for ever"),
  })
  .superRefine((v, ctx) => {
    if (!mmppShapeIsSquare(v, ctx)) return;
    const states = v.rates.length * (v.servers + v.waitingPositions + 1);
    if (states > MAX_MMPP_STATES) ctx.addIssue({ code: "custom", path: ["waitingPositions"], message: `phases × (N + Q + 1) = ${states} exceeds ${MAX_MMPP_STATES} states` });
  })
  .describe(`MMPP/M/N/N+Q: Markov-modulated Poisson arrivals, N servers, Q waiting positions, optional exponential patience. ${WAITING_MEASURES}`);
export type MmppQueueInput = z.input<typeof mmppQueueInputSchema>;

export interface MmppQueueResult {
  method: string;
  servers: number;
  waitingPositions: number;
  offeredTraffic: number;
  /** share of arrivals refused (servers and waiting positions all taken) */
  callCongestion: number;
  /** fraction of time all N servers are busy */
  timeCongestion: number;
  carriedTraffic: number;
  waitingProbability: number;
  meanWait: number;
  meanQueueLength: number;
  abandonmentProbability: number;
  lossProbability: number;
}

/**
 * The same level reduction as mmppLossSystem with the level = calls in the system (0..N+Q) and
 * departure rate min(k, N) μ + (k − N)⁺ α; waits by Little's law over admitted arrivals.
 */
export function mmppQueueSystem(input: MmppQueueInput): MmppQueueResult {
  const { servers: n, waitingPositions: q, rates, switching, meanHolding, meanPatience } = parseInput(mmppQueueInputSchema, input);
  const k = rates.length;
  const phaseRates = new Float64Array(k * k);
  for (let i = 0; i < k; i++) for (let l = 0; l < k; l++) phaseRates[i * k + l] = i === l ? 0 : switching[i][l];
  const theta = phaseStationary(phaseRates, k);
  if (!theta) throw inputError("switching", "the phase process must be irreducible (every phase reachable from every other)");
  const meanRate = rates.reduce((s, rate, i) => s + rate * theta[i], 0);
  if (!(meanRate > 0)) throw inputError("rates", "at least one phase needs a rate > 0");
  const mu = 1 / meanHolding;
  const alpha = meanPatience !== undefined ? 1 / meanPatience : 0;
  const capacity = n + q;
  const pi = solveEnvironmentLossChain(capacity, k, phaseRates, Float64Array.from(rates), mu, (j) => Math.min(j, n) * mu + Math.max(0, j - n) * alpha);
  let refused = 0;
  let admitted = 0;
  let admittedToWait = 0;
  let allBusy = 0;
  let busy = 0;
  let queue = 0;
  for (let j = 0; j <= capacity; j++) {
    for (let i = 0; i < k; i++) {
      const x = pi[j * k + i];
      const arrivals = rates[i] * x;
      if (j === capacity) refused += arrivals;
      else {
        admitted += arrivals;
        if (j >= n) admittedToWait += arrivals;
      }
      if (j >= n) allBusy += x;
      busy += Math.min(j, n) * x;
      queue += Math.max(0, j - n) * x;
    }
  }
  const abandonRate = alpha * queue;
  return assertFiniteResult(
    {
      method: "MMPP/M/N/N+Q exact CTMC, block-tridiagonal level reduction",
      servers: n,
      waitingPositions: q,
      offeredTraffic: meanRate * meanHolding,
      callCongestion: refused / meanRate,
      timeCongestion: allBusy,
      carriedTraffic: busy,
      waitingProbability: admitted > 0 ? admittedToWait / admitted : 0,
      meanWait: admitted > 0 ? queue / admitted : 0,
      meanQueueLength: queue,
      abandonmentProbability: admitted > 0 ? abandonRate / admitted : 0,
      lossProbability: Math.min(1, (refused + abandonRate) / meanRate),
    },
    "mmppQueueSystem",
  );
}
