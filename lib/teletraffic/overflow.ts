import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import {
  erlangBUnchecked,
  logErlangBUnchecked,
  MAX_SERVERS,
  MAX_TRAFFIC,
  minServersUnchecked,
  serversField,
  trafficField,
} from "./erlang-b";
import { solveBracketed } from "./solve";

export const overflowMomentsInputSchema = z
  .object({ traffic: trafficField, servers: serversField })
  .describe("Poisson traffic A offered to N servers (real N allowed); moments of the traffic that overflows");
export type OverflowMomentsInput = z.infer<typeof overflowMomentsInputSchema>;

export interface OverflowMoments {
  method: string;
  traffic: number;
  servers: number;
  mean: number;
  variance: number;
  peakedness: number;
}

/** Riordan's formulas (Wilkinson 1956): M = A B(N, A), V = M (1 - M + A / (N + 1 - A + M)). */
export function overflowMomentsUnchecked(traffic: number, servers: number): { mean: number; variance: number; peakedness: number } {
  const mean = traffic * erlangBUnchecked(servers, traffic);
  const peakedness = 1 - mean + traffic / (servers + 1 - traffic + mean);
  return { mean, variance: mean * peakedness, peakedness };
}

export function overflowMoments(input: OverflowMomentsInput): OverflowMoments {
  const { traffic, servers } = parseInput(overflowMomentsInputSchema, input);
  return assertFiniteResult({ method: "Riordan overflow moments", traffic, servers, ...overflowMomentsUnchecked(traffic, servers) }, "overflowMoments");
}

export const MAX_STREAM_MEAN = 100_000;
export const MAX_STREAM_VARIANCE = 1_000_000;
/** Equivalent random traffic beyond this makes the O(N*) inner solves too slow to be honest about. */
export const MAX_EQUIVALENT_TRAFFIC = 2_000_000;

const streamMean = z.number().gt(0).max(MAX_STREAM_MEAN).describe(`mean M of the offered (overflow) traffic in erlangs (0 < M <= ${MAX_STREAM_MEAN})`);
const streamVariance = z.number().gt(0).max(MAX_STREAM_VARIANCE).describe(`variance V of the offered traffic (0 < V <= ${MAX_STREAM_VARIANCE}); peakedness Z = V/M`);

export const equivalentRandomInputSchema = z
  .object({
    mean: streamMean,
    variance: streamVariance,
    servers: serversField.optional().describe("servers N of the group the stream is offered to (optional; real N allowed)"),
  })
  .describe("Wilkinson's equivalent random method: needs peakedness Z = V/M >= 1 (use Hayward for Z < 1)");
export type EquivalentRandomInput = z.infer<typeof equivalentRandomInputSchema>;

export interface EquivalentRandomResult {
  method: string;
  mean: number;
  variance: number;
  peakedness: number;
  equivalentTraffic: number;
  equivalentServers: number;
  rappTraffic: number;
  rappServers: number;
  iterations: number;
  servers?: number;
  lostTraffic?: number;
  blocking?: number;
  overflowMean?: number;
  overflowVariance?: number;
}

/** Real N with A B(N, A) = M, i.e. B(N, A) = M/A < 1. */
function serversForOverflowMean(traffic: number, mean: number): number {
  const target = mean / traffic;
  const logTarget = Math.log(target);
  const found = minServersUnchecked(traffic, target);
  if (found.logBlocking >= logTarget) return found.servers;
  return solveBracketed((x) => logErlangBUnchecked(x, traffic) - logTarget, found.servers - 1, found.servers, {
    fLo: found.logBlockingOneLess - logTarget,
    fHi: found.logBlocking - logTarget,
    relativeTolerance: 1e-15,
    absoluteTolerance: 1e-13,
  }).root;
}

export function equivalentRandomUnchecked(mean: number, variance: number): { traffic: number; servers: number; rappTraffic: number; rappServers: number; iterations: number } {
  const z = variance / mean;
  // Rapp (1964) starting values
  const rappTraffic = variance + 3 * z * (z - 1);
  const rappServers = (rappTraffic * (mean + z)) / (mean + z - 1) - mean - 1;
  if (z === 1) return { traffic: mean, servers: 0, rappTraffic, rappServers, iterations: 0 };
  // Rapp's value is within a few per cent of A*, so this rejects only streams far beyond the bound
  if (rappTraffic > 1.5 * MAX_EQUIVALENT_TRAFFIC) throw inputError("variance", `the equivalent random traffic (about ${rappTraffic.toPrecision(4)} erlangs by Rapp) would exceed ${MAX_EQUIVALENT_TRAFFIC}`);
  const logZ = Math.log(z);
  // Along the curve A B(N(A), A) = M the overflow peakedness rises from 1 (A = M, N = 0) without bound.
  const mismatch = (logA: number) => {
    const a = Math.exp(logA);
    const n = serversForOverflowMean(a, mean);
    const peakedness = 1 - mean + a / (n + 1 - a + mean);
    return Math.log(peakedness) - logZ;
  };
  let lo = Math.log(mean) + 1e-12 * Math.max(1, Math.abs(Math.log(mean)));
  let fLo = mismatch(lo);
  if (fLo >= 0) return { traffic: Math.exp(lo), servers: serversForOverflowMean(Math.exp(lo), mean), rappTraffic, rappServers, iterations: 1 };
  let hi = Math.log(Math.max(rappTraffic, mean * (1 + 1e-9)));
  let fHi = mismatch(hi);
  let evaluations = 2;
  while (fHi <= 0) {
    lo = hi;
    fLo = fHi;
    hi += Math.LN2;
    if (Math.exp(hi) > MAX_EQUIVALENT_TRAFFIC * 2) throw inputError("variance", `the equivalent random traffic would exceed ${MAX_EQUIVALENT_TRAFFIC} erlangs`);
    fHi = mismatch(hi);
    evaluations++;
  }
  const solved = solveBracketed(mismatch, lo, hi, { fLo, fHi, relativeTolerance: 0, absoluteTolerance: 1e-14 });
  const traffic = Math.exp(solved.root);
  if (traffic > MAX_EQUIVALENT_TRAFFIC) throw inputError("variance", `the equivalent random traffic ${traffic} exceeds ${MAX_EQUIVALENT_TRAFFIC} erlangs`);
  return { traffic, servers: serversForOverflowMean(traffic, mean), rappTraffic, rappServers, iterations: evaluations + solved.iterations };
}

/**
 * Wilkinson's equivalent random method (Wilkinson 1956; ITU-T E.521): the (M, V) stream is
 * treated as the overflow of A* Poisson erlangs from N* (real) servers. Rapp's approximation
 * seeds the bracket; the solve is a bracketed root in ln A* with the inner real N* from the
 * Erlang B continuation. Z = 1 gives A* = M, N* = 0 (plain Erlang B). Z < 1 is rejected.
 */
export function equivalentRandom(input: EquivalentRandomInput): EquivalentRandomResult {
  const { mean, variance, servers } = parseInput(equivalentRandomInputSchema, input);
  const z = variance / mean;
  if (z < 1) throw inputError("variance", `peakedness V/M = ${z} is below 1; equivalent random needs Z >= 1 (use Hayward's approximation for smooth traffic)`);
  const er = equivalentRandomUnchecked(mean, variance);
  const result: EquivalentRandomResult = {
    method: "Wilkinson equivalent random (Rapp start, bracketed solve)",
    mean,
    variance,
    peakedness: z,
    equivalentTraffic: er.traffic,
    equivalentServers: er.servers,
    rappTraffic: er.rappTraffic,
    rappServers: er.rappServers,
    iterations: er.iterations,
  };
  if (servers !== undefined) {
    if (er.servers + servers > MAX_SERVERS) throw inputError("servers", `N* + N exceeds ${MAX_SERVERS}`);
    const overflow = overflowMomentsUnchecked(er.traffic, er.servers + servers);
    result.servers = servers;
    result.lostTraffic = overflow.mean;
    result.blocking = Math.min(1, overflow.mean / mean);
    result.overflowMean = overflow.mean;
    result.overflowVariance = overflow.variance;
  }
  return assertFiniteResult(result, "equivalentRandom");
}

export const haywardInputSchema = z
  .object({
    mean: streamMean,
    variance: streamVariance,
    servers: serversField.describe("servers N the stream is offered to (real N allowed)"),
  })
  .describe("Hayward's approximation B(N/Z, M/Z); any peakedness Z > 0");
export type HaywardInput = z.infer<typeof haywardInputSchema>;

export interface HaywardResult {
  method: string;
  mean: number;
  variance: number;
  peakedness: number;
  servers: number;
  equivalentServers: number;
  equivalentTraffic: number;
  blocking: number;
  lostTraffic: number;
}

/** Hayward's approximation (Fredericks 1980): B ≈ B(N/Z, M/Z), fractional groups via the continuation. */
export function haywardBlocking(input: HaywardInput): HaywardResult {
  const { mean, variance, servers } = parseInput(haywardInputSchema, input);
  const z = variance / mean;
  if (servers / z > MAX_SERVERS) throw inputError("servers", `N/Z exceeds ${MAX_SERVERS}`);
  // Why: with N = 0 the N/Z check passes for any Z, and a very smooth stream (V = 1e-300) gave
  // M/Z = Infinity and a plain internal failure instead of an input error
  if (!(mean / z <= MAX_TRAFFIC)) throw inputError("variance", `M/Z = M²/V exceeds ${MAX_TRAFFIC} erlangs (peakedness ${z} too small)`);
  const blocking = erlangBUnchecked(servers / z, mean / z);
  return assertFiniteResult(
    {
      method: "Hayward approximation B(N/Z, A/Z)",
      mean,
      variance,
      peakedness: z,
      servers,
      equivalentServers: servers / z,
      equivalentTraffic: mean / z,
      blocking,
      lostTraffic: mean * blocking,
    },
    "haywardBlocking",
  );
}
