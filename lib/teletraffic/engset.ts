import { z } from "zod";
import { assertFiniteResult, parseInput, TeletrafficConvergenceError } from "./errors";

export const MAX_SOURCES = 10_000_000;

const sourcesField = z.number().int().min(1).max(MAX_SOURCES).describe(`number of traffic sources S (1..${MAX_SOURCES})`);
const engsetServersField = z.number().int().min(0).max(MAX_SOURCES).describe("integer number of servers N (N >= S means no blocking)");
const meanHoldingField = z.number().gt(0).max(1e12).default(1).describe("mean holding time h (> 0), default 1");

export const engsetInputSchema = z
  .object({
    sources: sourcesField,
    servers: engsetServersField,
    idleRate: z.number().min(0).max(1e12).describe("call rate of one idle source γ (calls per unit time, >= 0)"),
    meanHolding: meanHoldingField,
  })
  .describe("Engset loss system: S sources, N servers, each idle source calls at rate γ, exponential holding");
export type EngsetInput = z.input<typeof engsetInputSchema>;

export interface EngsetResult {
  method: string;
  sources: number;
  servers: number;
  idleRate: number;
  meanHolding: number;
  /** β = γ h, the offered traffic per idle source */
  offeredPerIdleSource: number;
  /** S β / (1 + β): the traffic the sources would carry with no blocking */
  offeredTraffic: number;
  carriedTraffic: number;
  /** time congestion E: fraction of time all N servers are busy */
  timeCongestion: number;
  /** call congestion B: fraction of call attempts blocked (= time congestion with S - 1 sources) */
  callCongestion: number;
  /** traffic congestion C = (offered - carried) / offered */
  trafficCongestion: number;
  callAttemptRate: number;
}

/** Truncated binomial p_j ∝ C(S, j) β^j, j = 0..min(N, S), built outward from the mode. */
function engsetDistribution(sources: number, servers: number, beta: number): Float64Array {
  const top = Math.min(servers, sources);
  const p = new Float64Array(top + 1);
  if (beta === 0) {
    p[0] = 1;
    return p;
  }
  const mode = Math.min(top, Math.floor(((sources + 1) * beta) / (1 + beta)));
  p[mode] = 1;
  for (let j = mode; j < top; j++) p[j + 1] = (p[j] * (sources - j) * beta) / (j + 1);
  for (let j = mode; j > 0; j--) p[j - 1] = (p[j] * j) / ((sources - j + 1) * beta);
  let sum = 0;
  for (let j = 0; j <= top; j++) sum += p[j];
  for (let j = 0; j <= top; j++) p[j] /= sum;
  return p;
}

function engsetFromBeta(sources: number, servers: number, beta: number) {
  const p = engsetDistribution(sources, servers, beta);
  const top = p.length - 1;
  let carried = 0;
  let attempts = 0; // Σ (S - j) p_j
  for (let j = 0; j <= top; j++) {
    carried += j * p[j];
    attempts += (sources - j) * p[j];
  }
  const blockingPossible = servers < sources;
  const timeCongestion = servers <= sources ? p[servers] : 0;
  const callCongestion = blockingPossible && attempts > 0 ? ((sources - servers) * p[servers]) / attempts : 0;
  const offeredTraffic = (sources * beta) / (1 + beta);
  // C = (S − N) E / S (Iversen, Teletraffic Engineering Handbook, Engset chapter), from the balance
  // Y = β (S − Y − (S − N) E). Why not (A − Y)/A: that difference cancels to rounding noise when C is
  // small (S = 1000, N = 10, β = 1e-4 gave 1.4e-16 for the exact 2.36e-17; S = 100, N = 50, β = 0.1 gave 0).
  const trafficCongestion = blockingPossible ? ((sources - servers) * timeCongestion) / sources : 0;
  return { timeCongestion, callCongestion, trafficCongestion, carried, attempts, offeredTraffic };
}

/** Engset (1918) by the exact truncated binomial; the three congestion measures differ for finite S. */
export function engset(input: EngsetInput): EngsetResult {
  const { sources, servers, idleRate, meanHolding } = parseInput(engsetInputSchema, input);
  const beta = idleRate * meanHolding;
  const r = engsetFromBeta(sources, servers, beta);
  return assertFiniteResult(
    {
      method: "Engset (finite sources, exact truncated binomial)",
      sources,
      servers,
      idleRate,
      meanHolding,
      offeredPerIdleSource: beta,
      offeredTraffic: r.offeredTraffic,
      carriedTraffic: r.carried,
      timeCongestion: r.timeCongestion,
      callCongestion: r.callCongestion,
      trafficCongestion: r.trafficCongestion,
      callAttemptRate: idleRate * r.attempts,
    },
    "engset",
  );
}

export const engsetIdleRateInputSchema = z
  .object({
    sources: sourcesField,
    servers: engsetServersField,
    offeredPerSource: z
      .number()
      .gt(0)
      .lt(1)
      .describe("offered traffic per source α in erlangs, 0 < α < 1 (call attempt rate × mean holding, attempts counted while idle)"),
    meanHolding: meanHoldingField,
    tolerance: z.number().gt(0).max(1e-3).default(1e-13).describe("relative change in β that ends the iteration"),
    maxIterations: z.number().int().min(1).max(1_000_000).default(100_000).describe("iteration cap; not converging throws"),
  })
  .describe("inverse Engset: idle-source call rate γ from the offered traffic per source α");
export type EngsetIdleRateInput = z.input<typeof engsetIdleRateInputSchema>;

export interface EngsetIdleRateResult extends EngsetResult {
  offeredPerSource: number;
  iterations: number;
  converged: true;
}

/**
 * Fixed point β = α / (1 - α (1 - C)) (Iversen, "Teletraffic Engineering Handbook (ITU-D, 2005)",
 * ITU-D handbook, Engset chapter), i.e. β = α / (1 - y(β)) with y the carried traffic per source.
 * From β₀ = α/(1-α) the iterates decrease monotonically towards the root (y is increasing in β),
 * so every α in (0, 1) is feasible; the iteration cap only guards against very slow convergence.
 */
export function engsetIdleRateForOfferedTraffic(input: EngsetIdleRateInput): EngsetIdleRateResult {
  const { sources, servers, offeredPerSource: alpha, meanHolding, tolerance, maxIterations } = parseInput(engsetIdleRateInputSchema, input);
  let beta = alpha / (1 - alpha);
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    iterations++;
    const r = engsetFromBeta(sources, servers, beta);
    const next = alpha / (1 - r.carried / sources);
    const change = Math.abs(next - beta);
    beta = next;
    if (change <= tolerance * beta) {
      converged = true;
      break;
    }
  }
  if (!converged) {
    throw new TeletrafficConvergenceError(
      `engsetIdleRateForOfferedTraffic: fixed point did not converge within ${maxIterations} iterations (last β = ${beta})`,
      iterations,
    );
  }
  const result = engset({ sources, servers, idleRate: beta / meanHolding, meanHolding });
  return {
    ...result,
    method: "Engset inverse: fixed point β = α / (1 - α (1 - C)), then exact Engset",
    // here the offered traffic is the given S α, and traffic congestion is measured against it. At the
    // fixed point S α = β (S − Y), so (S α − Y)/(S α) = (S − N) E / (S − Y), which is the call
    // congestion; taken from it rather than from the difference 1 − Y/(S α), which cancels when C is small
    offeredTraffic: sources * alpha,
    trafficCongestion: result.callCongestion,
    offeredPerSource: alpha,
    iterations,
    converged: true,
  };
}
