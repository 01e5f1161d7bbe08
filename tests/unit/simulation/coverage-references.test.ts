// Seeded runs against each new exact reference. For a correct engine and an exact reference the
// standardised error (estimate − exact) / SE is Student t with n − 1 degrees of freedom (the
// replications are i.i.d.; Law 2015, ch. 9), so each check |error| <= t(0.9995, n − 1) SE
// (expectAgrees) fails with probability 0.001 at a random seed; the seeds are fixed, so every
// check is deterministic. 47 checks at 0.001: a correct engine passes all at a random seed with
// probability >= 0.954 (0.999^47). Each run is sized so the relative half-width is a few per cent.
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { describe, expect, it } from "vitest";
import { parseScenario, runScenario, type ScenarioInput } from "../../../lib/simulation/node";
import { expectAgrees, reference, simulate } from "./helpers";

const REPLICATIONS = 20;
const run = (seed: number, calls = 20_000) => ({ seed, replications: REPLICATIONS, callsPerReplication: calls, warmupCalls: 2_000 });
const exponential = (mean: number) => ({ law: "exponential" as const, mean });

async function check(input: ScenarioInput, method: string, measures: Array<[string, string]>) {
  const r = await simulate(input);
  const ref = reference(r, method);
  expect(ref.exact, `${method} exact`).toBe(true);
  for (const [measure, field] of measures) {
    const interval = (r as unknown as Record<string, { estimate: number; standardError: number }>)[measure];
    const exact = (ref as Record<string, unknown>)[field] as number;
    expect(interval, measure).toBeDefined();
    expectAgrees(interval, exact, REPLICATIONS, `${method}: ${measure}`);
  }
}

describe("seeded runs agree with the new exact references (99.9 % t bound per check)", () => {
  it("retrial model: Poisson fresh calls, persistence 0.7, exponential retry delays", async () => {
    await check(
      { servers: 5, arrivals: { process: "poisson", rate: 4 }, holding: exponential(1), retrials: { persistence: 0.7, delay: exponential(0.5) }, run: run(101) },
      "retrial model exact chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["attemptsPerCall", "attemptsPerCall"], ["meanRetrying", "meanRetrying"], ["timeCongestion", "timeCongestion"]],
    );
  });
  it("finite sources with retrials", async () => {
    await check(
      { servers: 4, arrivals: { process: "finite-source", sources: 15, idleRate: 0.35 }, holding: exponential(1), retrials: { persistence: 0.8, delay: exponential(0.4) }, run: run(102) },
      "retrial model exact chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["meanRetrying", "meanRetrying"]],
    );
  });
  it("waiting with exponential patience (M/M/N/N+Q with abandonment)", async () => {
    await check(
      { servers: 5, waitingPositions: 3, patience: exponential(2), arrivals: { process: "poisson", rate: 5 }, holding: exponential(1), run: run(103) },
      "M/M/N/N+Q",
      [["callCongestion", "callCongestion"], ["waitingProbability", "waitingProbability"], ["meanWait", "meanWait"], ["abandonmentProbability", "abandonmentProbability"], ["lossProbability", "lossProbability"]],
    );
  });
  it("Engset with waiting positions", async () => {
    await check(
      { servers: 3, waitingPositions: 2, arrivals: { process: "finite-source", sources: 10, idleRate: 0.4 }, holding: exponential(1), run: run(104) },
      "Engset with waiting positions",
      [["callCongestion", "callCongestion"], ["meanWait", "meanWait"]],
    );
  });
  it("batches of uniform size 1..4, all-or-nothing, with a waiting room", async () => {
    await check(
      { servers: 8, waitingPositions: 2, arrivals: { process: "batch", rate: 2, batchSize: { law: "uniform", min: 1, max: 4 }, admission: "all-or-nothing" }, holding: exponential(1), run: run(105) },
      "batch Poisson exact chain",
      [["callCongestion", "callCongestion"], ["timeCongestion", "timeCongestion"], ["meanWait", "meanWait"]],
    );
  });
  it("MMPP with 16 phases", async () => {
    const k = 16;
    const rates = Array.from({ length: k }, (_, i) => 2 + (i % 4) * 3);
    const switching = Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, l) => (l === (i + 1) % k ? 0.5 : l === (i + 7) % k ? 0.25 : 0)));
    await check({ servers: 8, arrivals: { process: "mmpp", rates, switching }, holding: exponential(1), run: run(106) }, "MMPP/M/N/N exact chain", [
      ["callCongestion", "callCongestion"],
      ["timeCongestion", "timeCongestion"],
    ]);
  });
  it("MMPP (on-off) with waiting positions and patience", async () => {
    await check(
      { servers: 4, waitingPositions: 3, patience: exponential(1), arrivals: { process: "on-off", onRate: 8, meanOn: 1, meanOff: 1 }, holding: exponential(1), run: run(107) },
      "MMPP/M/N/N+Q exact chain",
      [["callCongestion", "callCongestion"], ["abandonmentProbability", "abandonmentProbability"]],
    );
  });
  it("retrials on on-off (MMPP) arrivals", async () => {
    await check(
      { servers: 4, arrivals: { process: "on-off", onRate: 8, meanOn: 1, meanOff: 1 }, holding: exponential(1), retrials: { persistence: 0.6, delay: exponential(0.5) }, run: run(110) },
      "MMPP retrial exact chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["attemptsPerCall", "attemptsPerCall"]],
    );
  });
  it("retrials on batches of uniform size 1..3, partial admission", async () => {
    await check(
      { servers: 5, arrivals: { process: "batch", rate: 1.5, batchSize: { law: "uniform", min: 1, max: 3 }, admission: "partial" }, holding: exponential(1), retrials: { persistence: 0.6, delay: exponential(0.5) }, run: run(111) },
      "batch retrial exact chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["meanRetrying", "meanRetrying"]],
    );
  });
  it("time-varying load with waiting positions and exponential patience (periodic N + Q chain)", async () => {
    // Horizon and warm-up are whole cycles (4.5), so each replication averages whole cycles of the periodic regime.
    await check(
      {
        servers: 4,
        waitingPositions: 3,
        patience: exponential(1),
        arrivals: { process: "time-varying", profile: [{ duration: 2, rate: 2 }, { duration: 1, rate: 9 }, { duration: 1.5, rate: 0.5 }] },
        holding: exponential(1),
        run: { seed: 109, replications: REPLICATIONS, horizon: 2_700, warmupTime: 27 },
      },
      "M(t)/M/N/N+Q periodic exact solution",
      [["callCongestion", "callCongestion"], ["waitingProbability", "waitingProbability"], ["meanWait", "meanWait"], ["abandonmentProbability", "abandonmentProbability"], ["lossProbability", "lossProbability"]],
    );
  });
  it("renewal (gamma) arrivals with waiting positions and exponential patience (GI/M/N/N+Q embedded chain)", async () => {
    await check(
      { servers: 4, waitingPositions: 3, patience: exponential(1.5), arrivals: { process: "renewal", interarrival: { law: "gamma", mean: 0.25, cv: 1.6 } }, holding: exponential(1), run: run(112) },
      "GI/M/N/N+Q embedded chain",
      [["callCongestion", "callCongestion"], ["meanWait", "meanWait"], ["lossProbability", "lossProbability"]],
    );
  });
  it("overflow traffic with waiting positions and patience at the group under study", async () => {
    await check(
      { servers: 3, waitingPositions: 2, patience: exponential(0.8), arrivals: { process: "overflow", primaries: [{ traffic: 4, servers: 3 }, { traffic: 1, servers: 0 }] }, holding: exponential(0.5), run: run(113) },
      "overflow network exact chain",
      [["callCongestion", "callCongestion"], ["meanWait", "meanWait"], ["abandonmentProbability", "abandonmentProbability"]],
    );
  });
  it("retrials on overflow traffic (refused overflow calls retry at the group under study)", async () => {
    await check(
      { servers: 3, arrivals: { process: "overflow", primaries: [{ traffic: 3, servers: 2 }, { traffic: 0.8, servers: 0 }] }, holding: exponential(1), retrials: { persistence: 0.6, delay: exponential(0.5) }, run: run(115) },
      "overflow retrial exact chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["attemptsPerCall", "attemptsPerCall"]],
    );
  });
  it("retrials on renewal (uniform interarrival) arrivals", async () => {
    await check(
      { servers: 3, arrivals: { process: "renewal", interarrival: { law: "uniform", min: 0.1, max: 0.6 } }, holding: exponential(1), retrials: { persistence: 0.6, delay: exponential(0.5) }, run: run(114) },
      "renewal retrial embedded chain",
      [["callCongestion", "callCongestion"], ["lossProbability", "lossProbability"], ["meanRetrying", "meanRetrying"]],
    );
  });
  it("renewal arrivals with lognormal interarrival times (numerical transform)", async () => {
    await check(
      { servers: 6, arrivals: { process: "renewal", interarrival: { law: "lognormal", mean: 0.2, cv: 1.8 } }, holding: exponential(1), run: run(108) },
      "GI/M/N/N (Palm-Takacs)",
      [["callCongestion", "callCongestion"], ["timeCongestion", "timeCongestion"]],
    );
  });
});

describe("Student t quantile at n = 3 replications through the public entry point", () => {
  it("half-width = t(0.975, 2) × standard error with t(0.975, 2) = 4.3027 (published t tables), not 1.96", async () => {
    // t(0.975, 2) = 4.303 in every printed t table (e.g. NIST/SEMATECH e-Handbook, section 1.3.6.7.2);
    // the normal 1.96 would be 2.2 times smaller.
    const r = await runScenario(parseScenario({ servers: 5, arrivals: { process: "poisson", rate: 4 }, holding: exponential(1), run: { seed: 7, replications: 3, callsPerReplication: 2_000 } }));
    const ratio = r.callCongestion.halfWidth / r.callCongestion.standardError;
    expect(r.callCongestion.standardError).toBeGreaterThan(0);
    expect(Math.abs(ratio - 4.303)).toBeLessThan(5e-4);
    expect(ratio).toBeCloseTo(tQuantile(0.975, 2), 10);
  });
});
