import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { equivalentRandomUnchecked, overflowMomentsUnchecked } from "./overflow";
import { erlangBUnchecked } from "./erlang-b";
import { solveEnvironmentLossChain } from "./qbd";

export const MAX_OVERFLOW_STATES = 200_000;
/** Level reduction costs (N+1)·K³ for K primary states; beyond this it would take seconds. */
export const MAX_OVERFLOW_WORK = 200_000_000;

export const overflowLossInputSchema = z
  .object({
    primaries: z
      .array(
        z.object({
          traffic: z.number().gt(0).max(1e4).describe("Poisson traffic offered to this primary group, erlangs"),
          servers: z.number().int().min(0).max(1000).describe("servers of this primary group (0: the traffic goes straight to the final group)"),
        }),
      )
      .min(1)
      .max(8)
      .describe("primary groups (1..8) whose overflow is offered to the final group"),
    servers: z.number().int().min(0).max(MAX_OVERFLOW_STATES - 1).describe("servers N of the final (overflow) group"),
  })
  .superRefine((v, ctx) => {
    const k = v.primaries.reduce((p, g) => p * (g.servers + 1), 1);
    const states = k * (v.servers + 1);
    if (states > MAX_OVERFLOW_STATES) {
      ctx.addIssue({ code: "custom", path: ["servers"], message: `state space Π(n_i + 1) × (N + 1) = ${states} exceeds ${MAX_OVERFLOW_STATES}` });
    } else if ((v.servers + 1) * k * k * k > MAX_OVERFLOW_WORK) {
      ctx.addIssue({ code: "custom", path: ["primaries"], message: `(N + 1) × K³ = ${(v.servers + 1) * k ** 3} exceeds ${MAX_OVERFLOW_WORK}, with K = Π(n_i + 1) = ${k} primary states` });
    }
  })
  .describe("overflow network: primary groups with own Poisson traffic, overflow offered to one final group, exponential holding with a common mean");
export type OverflowLossInput = z.infer<typeof overflowLossInputSchema>;

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
}

/**
 * Exact CTMC of the overflow network. The primaries evolve on their own (their overflow does not
 * feed back), so the final group sees a Markov-modulated Poisson stream with the joint primary
 * state as phase; the chain is solved exactly by the level reduction of qbd.ts. Equivalent random
 * and Hayward are given for the same combined stream (summed Riordan moments) for comparison.
 */
export function overflowLossSystem(input: OverflowLossInput): OverflowLossResult {
  const { primaries, servers: n } = parseInput(overflowLossInputSchema, input);
  const sizes = primaries.map((p) => p.servers + 1);
  const k = sizes.reduce((a, b) => a * b, 1);
  const stride: number[] = [];
  let acc = 1;
  for (const s of sizes) {
    stride.push(acc);
    acc *= s;
  }
  const phaseRates = new Float64Array(k * k);
  const up = new Float64Array(k);
  const digit = (phase: number, i: number) => Math.floor(phase / stride[i]) % sizes[i];
  for (let phase = 0; phase < k; phase++) {
    primaries.forEach((p, i) => {
      const busy = digit(phase, i);
      if (busy < p.servers) phaseRates[phase * k + phase + stride[i]] += p.traffic;
      else up[phase] += p.traffic;
      if (busy > 0) phaseRates[phase * k + phase - stride[i]] += busy;
    });
  }
  const pi = solveEnvironmentLossChain(n, k, phaseRates, up, 1);
  let offered = 0;
  let lost = 0;
  let timeCongestion = 0;
  const perOffered = new Float64Array(primaries.length);
  const perLost = new Float64Array(primaries.length);
  for (let phase = 0; phase < k; phase++) {
    let marginal = 0;
    for (let j = 0; j <= n; j++) marginal += pi[j * k + phase];
    const full = pi[n * k + phase];
    timeCongestion += full;
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
  const peakedness = variance / mean;
  if (peakedness < 1 - 1e-9) throw new Error("overflowLossSystem: summed overflow peakedness below 1");
  const er = equivalentRandomUnchecked(mean, Math.max(variance, mean));
  const erLost = er.traffic * erlangBUnchecked(er.servers + n, er.traffic);
  const hayward = erlangBUnchecked(n / peakedness, mean / peakedness);
  if (!(offered > 0)) throw inputError("primaries", "no traffic overflows to the final group");
  return assertFiniteResult(
    {
      method: "exact overflow CTMC (primaries as environment, level reduction) beside equivalent random and Hayward",
      servers: n,
      primaryStates: k,
      states: k * (n + 1),
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
    },
    "overflowLossSystem",
  );
}
