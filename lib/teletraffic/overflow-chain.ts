import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput, TeletrafficConvergenceError, TeletrafficInputError } from "./errors";
import { equivalentRandomUnchecked, overflowMomentsUnchecked } from "./overflow";
import { erlangBStateDistribution, erlangBUnchecked } from "./erlang-b";
import { gaussSeidelEnvironmentLossChain, solveEnvironmentLossChain } from "./qbd";
import { departureRate } from "./departures";

export const MAX_OVERFLOW_STATES = 200_000;
/** Level reduction costs (N+1)·K³ for K primary states; beyond this Gauss–Seidel is used instead. */
export const MAX_OVERFLOW_WORK = 200_000_000;
/** Gauss–Seidel budget: sweeps × states. */
const MAX_GAUSS_SEIDEL_WORK = 1_000_000_000;
const GAUSS_SEIDEL_TOLERANCE = 1e-14;

export const primaryGroupsSchema = z
  .array(
    z.object({
      traffic: z.number().gt(0).max(1e4).describe("Poisson traffic offered to this primary group, erlangs"),
      servers: z.number().int().min(0).max(1000).describe("servers of this primary group (0: the traffic goes straight to the final group)"),
    }),
  )
  .min(1)
  .max(8)
  .describe("primary groups (1..8) whose overflow is offered to the final group");

export const overflowLossInputSchema = z
  .object({
    primaries: primaryGroupsSchema,
    servers: z.number().int().min(0).max(MAX_OVERFLOW_STATES - 1).describe("servers N of the final (overflow) group"),
    waitingPositions: z.number().int().min(0).max(MAX_OVERFLOW_STATES - 1).default(0).describe("waiting positions Q (FIFO) at the final group, default 0"),
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a call waiting at the final group; default: waits for ever"),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time (primaries and final group), default 1; patience and waits are in the same unit"),
  })
  .superRefine((v, ctx) => {
    const k = v.primaries.reduce((p, g) => p * (g.servers + 1), 1);
    const states = k * (v.servers + v.waitingPositions + 1);
    if (states > MAX_OVERFLOW_STATES) {
      ctx.addIssue({ code: "custom", path: ["servers"], message: `state space Π(n_i + 1) × (N + Q + 1) = ${states} exceeds ${MAX_OVERFLOW_STATES}` });
    }
    if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
  })
  .describe(`overflow network: primary groups with own Poisson traffic, overflow offered to one final group, exponential holding with a common mean. ${WAITING_MEASURES} (with waiting positions the last three are under waiting)`);
export type OverflowLossInput = z.input<typeof overflowLossInputSchema>;

export interface OverflowLossResult {
  method: string;
  servers: number;
  primaryStates: number;
  states: number;
  /** overflow traffic offered to the final group (erlangs) */
  overflowOffered: number;
  overflowLost: number;
  /** lost overflow calls / overflow calls offered to the final group, exact */
  blocking: number;
  /** fraction of time all final-group servers are busy, exact */
  timeCongestion: number;
  perPrimary: Array<{ traffic: number; servers: number; overflowTraffic: number; blocking: number }>;
  overflowMean: number;
  overflowVariance: number;
  overflowPeakedness: number;
  equivalentRandomBlocking: number;
  equivalentRandomTraffic: number;
  equivalentRandomServers: number;
  haywardBlocking: number;
  /** With waiting positions at the final group (Q > 0): measures of the overflow calls admitted there. */
  waiting?: {
    waitingPositions: number;
    /** share of admitted overflow calls that wait, their mean wait (in the unit of meanHolding), share of admitted calls that abandon */
    waitingProbability: number;
    meanWait: number;
    meanQueueLength: number;
    abandonmentProbability: number;
    /** overflow calls refused or abandoning / overflow calls offered */
    lossProbability: number;
  };
}

export type PrimaryGroup = { traffic: number; servers: number };

/**
 * The primary groups as a Markov environment, in mean holding times: phase = mixed-radix vector
 * of busy servers per group (group i has stride Π_{j<i}(n_j + 1)); `edges` are the primaries'
 * own arrivals and departures, `up[phase]` the overflow rate (sum of the traffic of the groups that
 * are full). Shared by the overflow loss chain and the overflow retrial chain (orbit-chain.ts).
 */
export function primaryEnvironment(primaries: readonly PrimaryGroup[]): {
  phases: number;
  digit(phase: number, group: number): number;
  up: Float64Array;
  edges: Array<[from: number, to: number, rate: number]>;
} {
  const sizes = primaries.map((p) => p.servers + 1);
  const k = sizes.reduce((a, b) => a * b, 1);
  const stride: number[] = [];
  let acc = 1;
  for (const s of sizes) {
    stride.push(acc);
    acc *= s;
  }
  const digit = (phase: number, i: number) => Math.floor(phase / stride[i]) % sizes[i];
  const up = new Float64Array(k);
  const edges: Array<[number, number, number]> = [];
  for (let phase = 0; phase < k; phase++) {
    primaries.forEach((p, i) => {
      const busy = digit(phase, i);
      if (busy < p.servers) edges.push([phase, phase + stride[i], p.traffic]);
      else up[phase] += p.traffic;
      if (busy > 0) edges.push([phase, phase - stride[i], busy]);
    });
  }
  return { phases: k, digit, up, edges };
}

/**
 * Exact CTMC of the overflow network. The primaries evolve on their own (their overflow does not
 * feed back), so the final group sees a Markov-modulated Poisson stream with the joint primary
 * state as phase; the chain is solved by the level reduction of qbd.ts while (N+1)·K³ is small,
 * otherwise by Gauss–Seidel with a convergence and residual check. Equivalent random
 * and Hayward are given for the same combined stream (summed Riordan moments) for comparison.
 */
export function overflowLossSystem(input: OverflowLossInput): OverflowLossResult {
  const { primaries, servers: n, waitingPositions: q, meanPatience, meanHolding: h } = parseInput(overflowLossInputSchema, input);
  const capacity = n + q;
  // The chain runs in mean holding times: patience rate per holding time h / patience.
  const alpha = meanPatience !== undefined ? h / meanPatience : 0;
  const { phases: k, digit, up, edges } = primaryEnvironment(primaries);
  const inCount = new Int32Array(k + 1);
  const outRate = new Float64Array(k);
  for (const [from, to, rate] of edges) {
    inCount[to + 1]++;
    outRate[from] += rate;
  }
  const inStart = new Int32Array(k + 1);
  for (let l = 0; l < k; l++) inStart[l + 1] = inStart[l] + inCount[l + 1];
  const fill = Int32Array.from(inStart);
  const inFrom = new Int32Array(edges.length);
  const inRate = new Float64Array(edges.length);
  for (const [from, to, rate] of edges) {
    inFrom[fill[to]] = from;
    inRate[fill[to]++] = rate;
  }
  let pi: Float64Array;
  let solver: string;
  if ((capacity + 1) * k ** 3 <= MAX_OVERFLOW_WORK) {
    const phaseRates = new Float64Array(k * k);
    for (const [from, to, rate] of edges) phaseRates[from * k + to] += rate;
    // Level = calls at the final group (0..N+Q); those beyond N wait and abandon at rate α.
    pi = solveEnvironmentLossChain(capacity, k, phaseRates, up, 1, (j) => departureRate(j, n, 1, alpha));
    solver = "direct level reduction";
  } else {
    // start from the exact primary marginal (product of truncated Poisson) times a Poisson guess for the final group
    const marginals = primaries.map((p) => erlangBStateDistribution(p.servers, p.traffic));
    let overflowMean = 0;
    for (const p of primaries) overflowMean += overflowMomentsUnchecked(p.traffic, p.servers).mean;
    // (with a waiting room: the loss system's law over the servers, a thin geometric tail over the queue)
    const finalGuess = erlangBStateDistribution(n, overflowMean);
    const initial = new Float64Array(k * (capacity + 1));
    for (let phase = 0; phase < k; phase++) {
      let theta = 1;
      primaries.forEach((_, i) => (theta *= marginals[i][digit(phase, i)]));
      for (let j = 0; j <= capacity; j++) initial[j * k + phase] = theta * (j <= n ? finalGuess[j] : finalGuess[n] * 0.5 ** (j - n)) + 1e-300;
    }
    const states = k * (capacity + 1);
    const maxSweeps = Math.max(100, Math.floor(MAX_GAUSS_SEIDEL_WORK / states));
    const death = Float64Array.from({ length: capacity + 1 }, (_, j) => departureRate(j, n, 1, alpha));
    const solved = gaussSeidelEnvironmentLossChain(capacity, { phases: k, inStart, inFrom, inRate, outRate }, up, death, initial, GAUSS_SEIDEL_TOLERANCE, maxSweeps);
    if (!solved) throw new TeletrafficConvergenceError(`overflowLossSystem: Gauss–Seidel did not converge within ${maxSweeps} sweeps`, maxSweeps);
    pi = solved.pi;
    solver = `Gauss–Seidel (${solved.sweeps} sweeps, L1 change <= ${GAUSS_SEIDEL_TOLERANCE}, residual ${solved.residual.toExponential(1)})`;
  }
  let offered = 0;
  let lost = 0;
  let timeCongestion = 0;
  let toWait = 0;
  let queue = 0;
  const perOffered = new Float64Array(primaries.length);
  const perLost = new Float64Array(primaries.length);
  for (let phase = 0; phase < k; phase++) {
    let marginal = 0;
    for (let j = 0; j <= capacity; j++) {
      const x = pi[j * k + phase];
      marginal += x;
      if (j >= n) timeCongestion += x;
      if (j >= n && j < capacity) toWait += x * up[phase];
      queue += Math.max(0, j - n) * x;
    }
    const full = pi[capacity * k + phase];
    offered += marginal * up[phase];
    lost += full * up[phase];
    primaries.forEach((p, i) => {
      if (digit(phase, i) === p.servers) {
        perOffered[i] += marginal * p.traffic;
        perLost[i] += full * p.traffic;
      }
    });
  }
  let mean = 0;
  let variance = 0;
  for (const p of primaries) {
    const m = overflowMomentsUnchecked(p.traffic, p.servers);
    mean += m.mean;
    variance += m.variance;
  }
  // Why here: a primary with far more servers than traffic (0.001 E on 1000 servers) has an overflow
  // mean that underflows to 0, and V/M was NaN, a plain internal failure, before the check below ran
  if (!(offered > 0) || !(mean > 1e-280)) throw inputError("primaries", `no traffic overflows to the final group (overflow mean ${mean} erlangs is below the float range)`);
  const peakedness = variance / mean;
  if (peakedness < 1 - 1e-9) throw new Error("overflowLossSystem: summed overflow peakedness below 1");
  let er: ReturnType<typeof equivalentRandomUnchecked>;
  try {
    er = equivalentRandomUnchecked(mean, Math.max(variance, mean));
  } catch (error) {
    if (error instanceof TeletrafficInputError) throw inputError("primaries", `equivalent random for the combined stream: ${error.message}`);
    throw error;
  }
  const erLost = er.traffic * erlangBUnchecked(er.servers + n, er.traffic);
  const hayward = erlangBUnchecked(n / peakedness, mean / peakedness);
  if (!(offered > 0)) throw inputError("primaries", "no traffic overflows to the final group");
  const admitted = offered - lost;
  const waiting =
    q > 0
      ? {
          waitingPositions: q,
          waitingProbability: admitted > 0 ? toWait / admitted : 0,
          meanWait: admitted > 0 ? (queue / admitted) * h : 0,
          meanQueueLength: queue,
          abandonmentProbability: admitted > 0 ? (alpha * queue) / admitted : 0,
          lossProbability: Math.min(1, (lost + alpha * queue) / offered),
        }
      : undefined;
  return assertFiniteResult(
    {
      method: `exact overflow CTMC (primaries as environment${q > 0 ? `, ${q} waiting positions at the final group${alpha > 0 ? " with exponential patience" : ""}` : ""}), ${solver}; equivalent random and Hayward beside it${q > 0 ? " (for the loss system, as a comparison only)" : ""}`,
      servers: n,
      primaryStates: k,
      states: k * (capacity + 1),
      overflowOffered: offered,
      overflowLost: lost,
      blocking: lost / offered,
      timeCongestion,
      perPrimary: primaries.map((p, i) => ({
        traffic: p.traffic,
        servers: p.servers,
        overflowTraffic: perOffered[i],
        blocking: perOffered[i] > 0 ? perLost[i] / perOffered[i] : 0,
      })),
      overflowMean: mean,
      overflowVariance: variance,
      overflowPeakedness: peakedness,
      equivalentRandomBlocking: Math.min(1, erLost / mean),
      equivalentRandomTraffic: er.traffic,
      equivalentRandomServers: er.servers,
      haywardBlocking: hayward,
      ...(waiting ? { waiting } : {}),
    },
    "overflowLossSystem",
  );
}
