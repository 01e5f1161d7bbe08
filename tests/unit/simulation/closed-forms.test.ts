// Simulation against exact closed forms and exact chains from lib/teletraffic.
// Every check: see expectAgrees in helpers.ts for the 99.9 % Student-t bound.
import { describe, expect, it } from "vitest";
import { erlangB } from "../../../lib/teletraffic";
import { parseScenario, ratioInterval, runReplication, type ScenarioInput } from "../../../lib/simulation";
import { expectAgrees, reference, simulate } from "./helpers";

const run = (seed: number, calls = 50_000, replications = 20) => ({ seed, replications, callsPerReplication: calls, warmupCalls: 2_000 });
const poisson = { process: "poisson" as const, rate: 8 };
const B_10_8 = erlangB(10, 8); // 0.12166...

describe("M/M/N/N and M/G/N/N: Erlang B (Erlang 1917; insensitivity: Sevastyanov 1957)", () => {
  it("Poisson arrivals, exponential holding: call and time congestion and carried traffic match Erlang B", async () => {
    const r = await simulate({ servers: 10, arrivals: poisson, holding: { law: "exponential", mean: 1 }, run: run(101) });
    expectAgrees(r.callCongestion, B_10_8, 20, "call congestion vs Erlang B");
    expectAgrees(r.timeCongestion, B_10_8, 20, "time congestion vs Erlang B");
    expectAgrees(r.carriedTraffic, 8 * (1 - B_10_8), 20, "carried traffic vs A(1 - B)");
    // The nominal 95 % interval also covers Erlang B at this seed (the coverage test checks the rate).
    expect(r.callCongestion.ciLow).toBeLessThanOrEqual(B_10_8);
    expect(r.callCongestion.ciHigh).toBeGreaterThanOrEqual(B_10_8);
    const ref = reference(r, "Erlang B");
    expect(ref.exact).toBe(true);
    expect(ref.callCongestion).toBeCloseTo(B_10_8, 14);
  });

  it("occupancy distribution: truncated Poisson p_k ∝ A^k / k! (Erlang 1917) at every k", () => {
    const s = parseScenario({ servers: 10, arrivals: poisson, holding: { law: "exponential", mean: 1 }, run: run(102) });
    const reps = Array.from({ length: 20 }, (_, i) => runReplication(s, i));
    const weights: number[] = [];
    for (let k = 0, term = 1; k <= 10; k++, term *= 8 / k) weights.push(term);
    const norm = weights.reduce((a, b) => a + b, 0);
    for (let k = 0; k <= 10; k++) {
      const ci = ratioInterval(reps.map((r) => r.occupancy[k]), reps.map((r) => r.time), 0.95);
      expectAgrees(ci, weights[k] / norm, 20, `time fraction with ${k} busy`);
    }
  });

  const laws: Array<[string, ScenarioInput["holding"]]> = [
    ["lognormal cv 2", { law: "lognormal", mean: 1, cv: 2 }],
    ["deterministic", { law: "deterministic", value: 1 }],
    ["Pareto shape 2.5", { law: "pareto", mean: 1, shape: 2.5 }],
    ["hyperexponential scv 4", { law: "hyperexponential", mean: 1, scv: 4 }],
  ];
  for (const [name, holding] of laws) {
    it(`insensitivity: ${name} holding with mean 1 gives Erlang B`, async () => {
      const r = await simulate({ servers: 10, arrivals: poisson, holding, run: run(202) });
      expectAgrees(r.callCongestion, B_10_8, 20, `${name}: call congestion vs Erlang B`);
      expectAgrees(r.timeCongestion, B_10_8, 20, `${name}: time congestion vs Erlang B`);
      expect(reference(r, "Erlang B").exact).toBe(true);
    });
  }

  it("retrials with persistence 0 are plain Erlang B (every refused call is lost)", async () => {
    const r = await simulate({ servers: 10, arrivals: poisson, holding: { law: "gamma", mean: 1, cv: 0.5 }, retrials: { persistence: 0, delay: { law: "exponential", mean: 3 } }, run: run(303) });
    expectAgrees(r.callCongestion, B_10_8, 20, "first-attempt blocking vs Erlang B");
    expectAgrees(r.lossProbability!, B_10_8, 20, "loss probability vs Erlang B");
    expect(r.attemptsPerCall!.estimate).toBe(1);
  });
});

describe("finite sources: Engset (Engset 1918; insensitive to the holding law)", () => {
  for (const holding of [{ law: "exponential", mean: 1 }, { law: "lognormal", mean: 1, cv: 1.5 }] as const) {
    it(`20 sources, idle rate 0.5, 8 servers, ${holding.law} holding`, async () => {
      const r = await simulate({ servers: 8, arrivals: { process: "finite-source", sources: 20, idleRate: 0.5 }, holding, run: run(404) });
      const ref = reference(r, "Engset");
      expect(ref.exact).toBe(true);
      expectAgrees(r.callCongestion, ref.callCongestion!, 20, "call congestion vs Engset");
      expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "time congestion vs Engset");
      expectAgrees(r.carriedTraffic, ref.carriedTraffic!, 20, "carried traffic vs Engset");
    });
  }
});

describe("renewal arrivals, exponential holding: GI/M/N/N (Palm-Takacs; Takacs 1962)", () => {
  const laws = [
    { law: "erlang", k: 3, mean: 0.125 },
    { law: "hyperexponential", mean: 0.125, scv: 4 },
    { law: "deterministic", value: 0.125 },
  ] as const;
  for (const interarrival of laws) {
    it(`${interarrival.law} interarrival times`, async () => {
      const r = await simulate({ servers: 10, arrivals: { process: "renewal", interarrival }, holding: { law: "exponential", mean: 1 }, run: run(505) });
      const ref = reference(r, "GI/M/N/N (Palm-Takacs)");
      expect(ref.exact).toBe(true);
      expectAgrees(r.callCongestion, ref.callCongestion!, 20, "call congestion vs Takacs");
      expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "time congestion vs Takacs");
      // and it is far from Erlang B: the check can tell smooth/peaked traffic apart
      expect(Math.abs(ref.callCongestion! - B_10_8) / B_10_8).toBeGreaterThan(0.3);
    });
  }
});

describe("Markov-modulated Poisson arrivals: exact MMPP/M/N/N chain (Heffes & Lucantoni 1986 model; level reduction)", () => {
  it("on-off source", async () => {
    const r = await simulate({ servers: 10, arrivals: { process: "on-off", onRate: 16, meanOn: 1, meanOff: 1 }, holding: { law: "exponential", mean: 1 }, run: run(606) });
    const ref = reference(r, "MMPP/M/N/N exact chain");
    expect(ref.exact).toBe(true);
    expectAgrees(r.callCongestion, ref.callCongestion!, 20, "call congestion vs MMPP chain");
    expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "time congestion vs MMPP chain");
  });
  it("three phases", async () => {
    const arrivals = { process: "mmpp" as const, rates: [4, 12, 0.5], switching: [[0, 0.5, 0.2], [0.3, 0, 0.3], [0.4, 0.1, 0]] };
    const r = await simulate({ servers: 10, arrivals, holding: { law: "exponential", mean: 1 }, run: run(607) });
    const ref = reference(r, "MMPP/M/N/N exact chain");
    expectAgrees(r.callCongestion, ref.callCongestion!, 20, "call congestion vs MMPP chain");
    expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "time congestion vs MMPP chain");
  });
});

describe("batch Poisson arrivals, geometric batches: exact one-dimensional chain", () => {
  for (const admission of ["partial", "all-or-nothing"] as const) {
    it(`${admission} admission`, async () => {
      const r = await simulate({ servers: 10, arrivals: { process: "batch", rate: 3, batchSize: { law: "geometric", mean: 2 }, admission }, holding: { law: "exponential", mean: 1 }, run: run(707) });
      const ref = reference(r, "batch Poisson exact chain");
      expect(ref.exact).toBe(true);
      expectAgrees(r.callCongestion, ref.callCongestion!, 20, "per-call congestion vs batch chain");
      expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "time congestion vs batch chain");
    });
  }
});

describe("M/M/N/N+Q finite waiting (Erlang loss-delay system)", () => {
  it("10 servers, 5 waiting positions, 9 erlangs", async () => {
    const r = await simulate({ servers: 10, waitingPositions: 5, arrivals: { process: "poisson", rate: 9 }, holding: { law: "exponential", mean: 1 }, run: run(808) });
    const ref = reference(r, "M/M/N/N+Q");
    expect(ref.exact).toBe(true);
    expectAgrees(r.callCongestion, ref.callCongestion!, 20, "refused share vs P(full)");
    expectAgrees(r.timeCongestion, ref.timeCongestion!, 20, "all servers busy vs M/M/N/N+Q");
    expectAgrees(r.waitingProbability!, ref.waitingProbability!, 20, "probability of waiting (admitted calls)");
    expectAgrees(r.meanWait!, ref.meanWait!, 20, "mean wait (Little's law form)");
    expectAgrees(r.meanWaiting!, ref.meanWaiting!, 20, "mean number waiting");
  });
});

describe("overflow: exact chain of primaries plus the group under study", () => {
  it("one primary group: simulation agrees with the chain, and equivalent random reproduces the chain (Wilkinson 1956)", async () => {
    const r = await simulate({ servers: 6, arrivals: { process: "overflow", primaries: [{ traffic: 8, servers: 10 }] }, holding: { law: "exponential", mean: 1 }, run: run(909, 20_000) });
    const chain = reference(r, "overflow network exact chain");
    expect(chain.exact).toBe(true);
    expectAgrees(r.callCongestion, chain.callCongestion!, 20, "overflow call congestion vs exact chain");
    expectAgrees(r.timeCongestion, chain.timeCongestion!, 20, "time congestion vs exact chain");
    const er = reference(r, "Wilkinson equivalent random");
    // A single Poisson primary is its own equivalent random group: the same blocking up to solver tolerance.
    expect(Math.abs(er.callCongestion! / chain.callCongestion! - 1)).toBeLessThan(1e-6);
  });

  it("a peaked overflow plus a direct Poisson stream: simulation follows the chain, equivalent random is off by about 25 %", async () => {
    const r = await simulate({
      servers: 14,
      arrivals: { process: "overflow", primaries: [{ traffic: 20, servers: 20 }, { traffic: 1, servers: 0 }] },
      holding: { law: "exponential", mean: 1 },
      run: run(910, 100_000, 12),
    });
    const chain = reference(r, "overflow network exact chain");
    const er = reference(r, "Wilkinson equivalent random");
    expectAgrees(r.callCongestion, chain.callCongestion!, 12, "overflow call congestion vs exact chain");
    // ER treats the sum as one overflow stream with the summed moments; it underestimates here.
    expect(er.callCongestion! / chain.callCongestion!).toBeLessThan(0.8);
    const far = Math.abs(r.callCongestion.estimate - er.callCongestion!) / r.callCongestion.standardError;
    expect(far, "ER lies many standard errors away from the simulation").toBeGreaterThan(6);
  });
});
