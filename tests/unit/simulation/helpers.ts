import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { expect } from "vitest";
import { parseScenario, runScenario, type Interval, type ScenarioInput, type SimulationResult } from "../../../lib/simulation/node";

export async function simulate(input: ScenarioInput): Promise<SimulationResult> {
  return runScenario(parseScenario(input));
}

/**
 * Agreement with an exact value at the 99.9 % level: for a correct engine the standardised error
 * (estimate - exact) / SE is Student t with n-1 degrees of freedom (replications are i.i.d.), so
 * |error| <= t(0.9995, n-1) SE fails with probability 0.001 at a random seed; the seeds are fixed,
 * so each check is deterministic. The runs are sized so the relative half-width is a few percent,
 * which is what the check can detect.
 */
export function expectAgrees(measure: Pick<Interval, "estimate" | "standardError">, exact: number, replications: number, what: string): void {
  const bound = tQuantile(0.9995, replications - 1) * measure.standardError;
  expect(measure.standardError, `${what}: standard error`).toBeGreaterThan(0);
  expect(Math.abs(measure.estimate - exact), `${what}: |${measure.estimate} - ${exact}| <= ${bound}`).toBeLessThanOrEqual(bound);
}

/** The reference with this method name (the test fails if it is missing or unavailable). */
export function reference(result: SimulationResult, method: string) {
  const ref = result.references.find((r) => r.method === method);
  expect(ref, `reference ${method}`).toBeDefined();
  expect(ref!.unavailable, `reference ${method} unavailable`).toBeUndefined();
  return ref!;
}
