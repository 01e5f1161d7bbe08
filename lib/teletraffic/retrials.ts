import { z } from "zod";
import { assertFiniteResult, parseInput } from "./errors";
import { erlangBUnchecked, serversField } from "./erlang-b";
import { solveBracketed } from "./solve";

/** Plain fixed-point steps before switching to a bracketed root (each step costs O(N)). */
const PLAIN_ITERATIONS = 200;

export const extendedErlangBInputSchema = z
  .object({
    servers: serversField,
    traffic: z.number().gt(0).max(1e7).describe("fresh (first-attempt) offered traffic A in erlangs, > 0"),
    persistence: z.number().min(0).lt(1).describe("persistence r: probability a blocked call tries again, 0 <= r < 1 (the scenario file's retrials.persistence)"),
    tolerance: z.number().gt(0).max(1e-3).default(1e-12).describe("relative change of the offered total that ends the iteration"),
    maxIterations: z.number().int().min(1).max(10_000_000).default(10_000).describe("cap on fixed-point steps plus root-solver steps"),
  })
  .describe("extended Erlang B: blocked calls return (after a long enough delay) with probability r; an approximation (compare retrial-loss, the exact model)");
export type ExtendedErlangBInput = z.input<typeof extendedErlangBInputSchema>;

export interface ExtendedErlangBResult {
  method: string;
  servers: number;
  traffic: number;
  persistence: number;
  blocking: number;
  offeredTotal: number;
  carriedTraffic: number;
  retryTraffic: number;
  lostTraffic: number;
  probabilityFreshCallLost: number;
  iterations: number;
  converged: boolean;
}

/**
 * Extended Erlang B (Jewett & Shrago 1975, "Designing optimal trunk groups with repeated attempts"):
 * A_tot = A + r A_tot B(N, A_tot). From A_tot = A the iterates increase monotonically to the fixed point.
 * "converged" reports whether the tolerance was met within maxIterations; the values are the last iterate.
 */
export function extendedErlangB(input: ExtendedErlangBInput): ExtendedErlangBResult {
  const { servers, traffic, persistence: r, tolerance, maxIterations } = parseInput(extendedErlangBInputSchema, input);
  let offered = traffic;
  let blocking = erlangBUnchecked(servers, offered);
  let iterations = 0;
  let converged = false;
  let finishedByRoot = false;
  const plainLimit = Math.min(maxIterations, PLAIN_ITERATIONS);
  while (iterations < plainLimit) {
    iterations++;
    const next = traffic + r * offered * blocking;
    const change = Math.abs(next - offered);
    offered = next;
    blocking = erlangBUnchecked(servers, offered);
    if (change <= tolerance * offered) {
      converged = true;
      break;
    }
  }
  if (!converged && iterations < maxIterations) {
    // Slow contraction (heavy load, r near 1). X (1 - r B(N, X)) = carried + (1 - r) lost is strictly
    // increasing in X, so the fixed point is the unique root in [current iterate, A / (1 - r)].
    const g = (x: number) => x * (1 - r * erlangBUnchecked(servers, x)) - traffic;
    const solved = solveBracketed(g, offered, traffic / (1 - r), { relativeTolerance: tolerance * 1e-2, maxIterations: maxIterations - iterations });
    iterations += solved.iterations;
    offered = solved.root;
    blocking = erlangBUnchecked(servers, offered);
    converged = Math.abs(traffic + r * offered * blocking - offered) <= 10 * tolerance * offered;
    finishedByRoot = true;
  }
  const lost = (1 - r) * offered * blocking;
  return assertFiniteResult(
    {
      method: finishedByRoot
        ? "extended Erlang B (repeated attempts): fixed-point iteration finished by a bracketed root"
        : "extended Erlang B (repeated attempts, fixed-point iteration)",
      servers,
      traffic,
      persistence: r,
      blocking,
      offeredTotal: offered,
      carriedTraffic: offered * (1 - blocking),
      retryTraffic: r * offered * blocking,
      lostTraffic: lost,
      probabilityFreshCallLost: lost / traffic,
      iterations,
      converged,
    },
    "extendedErlangB",
  );
}
