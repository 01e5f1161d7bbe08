import { z } from "zod";
import { assertFiniteResult, parseInput } from "./errors";
import { erlangBUnchecked, serversField } from "./erlang-b";

export const extendedErlangBInputSchema = z
  .object({
    servers: serversField,
    traffic: z.number().gt(0).max(1e7).describe("fresh (first-attempt) offered traffic A in erlangs, > 0"),
    recallFactor: z.number().min(0).lt(1).describe("recall factor r (persistence): probability a blocked call tries again, 0 <= r < 1"),
    tolerance: z.number().gt(0).max(1e-3).default(1e-12).describe("relative change of the offered total that ends the iteration"),
    maxIterations: z.number().int().min(1).max(10_000_000).default(1_000_000).describe("iteration cap"),
  })
  .describe("extended Erlang B: blocked calls return (after a long enough delay) with probability r");
export type ExtendedErlangBInput = z.input<typeof extendedErlangBInputSchema>;

export interface ExtendedErlangBResult {
  method: string;
  servers: number;
  traffic: number;
  recallFactor: number;
  blocking: number;
  offeredTotal: number;
  carriedTraffic: number;
  recallTraffic: number;
  lostTraffic: number;
  probabilityFreshCallLost: number;
  iterations: number;
  converged: boolean;
}

/**
 * Extended Erlang B (Jewett & Shrago 1975, "Designing optimal trunk groups with repeated attempts"):
 * A_tot = A + r A_tot B(N, A_tot). From A_tot = A the iterates increase monotonically to the fixed point.
 */
export function extendedErlangB(input: ExtendedErlangBInput): ExtendedErlangBResult {
  const { servers, traffic, recallFactor: r, tolerance, maxIterations } = parseInput(extendedErlangBInputSchema, input);
  let offered = traffic;
  let blocking = erlangBUnchecked(servers, offered);
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
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
  const lost = (1 - r) * offered * blocking;
  return assertFiniteResult(
    {
      method: "extended Erlang B (repeated attempts, fixed-point iteration)",
      servers,
      traffic,
      recallFactor: r,
      blocking,
      offeredTotal: offered,
      carriedTraffic: offered * (1 - blocking),
      recallTraffic: r * offered * blocking,
      lostTraffic: lost,
      probabilityFreshCallLost: lost / traffic,
      iterations,
      converged,
    },
    "extendedErlangB",
  );
}
