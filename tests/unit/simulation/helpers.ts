import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { expect } from "vitest";
import { aggregateReplications, buildResult, parseScenario, ReplicationJob, runScenario, type Interval, type Reference, type ScenarioInput, type SimulationResult } from "../../../lib/simulation/node";

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

/**
 * A result from the reference event loop (engine.ts) run in-process, folded and built exactly as
 * runScenario does (aggregate.ts, buildResult). The estimators and warnings read only the
 * per-replication counters, so this checks them on the loop that defines those counters.
 */
export function simulateReference(input: ScenarioInput, references: Reference[] = []): SimulationResult {
  const scenario = parseScenario(input);
  const stats = Array.from({ length: scenario.run.replications }, (_, i) => {
    const job = new ReplicationJob(scenario, i, "reference");
    while (!job.advance(Number.MAX_SAFE_INTEGER));
    return job.stats();
  });
  return buildResult(scenario, aggregateReplications(stats, scenario.servers), references);
}

/**
 * Coverage over independent seeded runs: the number of runs whose interval covers the exact value
 * is Binomial(RUNS, 0.95) for an honest interval. The acceptance region [low, high] is chosen so an
 * honest engine fails with probability below 0.002 (computed below from the binomial law), while
 * intervals 30 % too narrow (coverage about 0.85, see coverage.test.ts) fail with near certainty.
 */
export function coverageRegion(runs: number): { low: number; high: number; fail: number; passNarrow: number } {
  let low = 0;
  while (binomialCdf(low, runs, 0.95) < 0.001) low++;
  let high = runs;
  while (1 - binomialCdf(high - 1, runs, 0.95) < 0.001) high--;
  const fail = binomialCdf(low - 1, runs, 0.95) + (1 - binomialCdf(high, runs, 0.95));
  return { low, high, fail, passNarrow: 1 - binomialCdf(low - 1, runs, 0.85) };
}

export function coverageCount(runs: number, exact: number, make: (seed: number) => ScenarioInput): { covered: number; methods: Set<string> } {
  let covered = 0;
  const methods = new Set<string>();
  for (let run = 0; run < runs; run++) {
    const r = simulateReference(make(20_000 + run));
    if (r.callCongestion.ciLow <= exact && exact <= r.callCongestion.ciHigh) covered++;
    methods.add(r.callCongestion.method ?? "");
  }
  return { covered, methods };
}
