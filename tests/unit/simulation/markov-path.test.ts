// The Markov path (markov-path.ts): a different estimator of the same model, so it is checked
// against exact values (Erlang B and Engset product forms computed here), against the reference
// event loop statistically, and for coverage of its confidence intervals at fixed seeds.
import binomialCdf from "@stdlib/stats-base-dists-binomial-cdf";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { describe, expect, it } from "vitest";
import { enginePathFor } from "../../../lib/simulation/dispatch";
import { markovPathRefusal } from "../../../lib/simulation/markov-path";
import { parseScenario, runScenario, type ScenarioInput } from "../../../lib/simulation/node";
import { overflowLossSystem, renewalLossSystem } from "../../../lib/teletraffic";
import { coverageRegion, expectAgrees } from "./helpers";

const exp1 = { law: "exponential", mean: 1 } as const;

/** Erlang B by its product form p_n = (A^n / n!) / sum_k A^k / k! (Erlang 1917), in logs. */
function erlangBExact(n: number, a: number): number {
  let logTerm = 0;
  const logs = [0];
  for (let k = 1; k <= n; k++) logs.push((logTerm += Math.log(a) - Math.log(k)));
  const max = Math.max(...logs);
  const sum = logs.reduce((s, l) => s + Math.exp(l - max), 0);
  return Math.exp(logs[n] - max) / sum;
}

/** Engset: p_n proportional to C(S, n) beta^n, beta = idle rate x mean holding; call congestion weights p_n by the idle sources S - n. */
function engsetExact(sources: number, n: number, beta: number): { time: number; call: number } {
  const p: number[] = [1];
  for (let k = 1; k <= n; k++) p.push((p[k - 1] * (sources - k + 1) * beta) / k);
  const total = p.reduce((s, x) => s + x, 0);
  const offered = p.reduce((s, x, k) => s + (sources - k) * x, 0);
  return { time: p[n] / total, call: ((sources - n) * p[n]) / offered };
}

describe("Markov path: dispatch rule", () => {
  it("runs Markovian loss groups and refuses every other shape with the reason", () => {
    const base = { servers: 10, arrivals: { process: "poisson", rate: 8 }, holding: exp1, run: { seed: 1, replications: 2, callsPerReplication: 1000 } } as const;
    expect(enginePathFor(parseScenario(base))).toBe("markov");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "on-off", onRate: 10, meanOn: 1, meanOff: 2 } }))).toBe("markov");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "finite-source", sources: 20, idleRate: 0.5 } }))).toBe("markov");
    expect(markovPathRefusal(parseScenario({ ...base, holding: { law: "erlang", k: 2, mean: 1 } }))).toBe("holding is not exponential");
    expect(markovPathRefusal(parseScenario({ ...base, waitingPositions: 2 }))).toBe("a waiting line");
    expect(markovPathRefusal(parseScenario({ ...base, retrials: { persistence: 0.5, delay: exp1 } }))).toBe("repeated attempts");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "renewal", interarrival: { law: "hyperexponential", mean: 0.125, scv: 4 } } }))).toBe("markov");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "renewal", interarrival: { law: "erlang", k: 3, mean: 0.125 } } }))).toBe("markov");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "overflow", primaries: [{ traffic: 6, servers: 5 }] } }))).toBe("markov");
    expect(markovPathRefusal(parseScenario({ ...base, arrivals: { process: "renewal", interarrival: { law: "lognormal", mean: 0.125, cv: 2 } } }))).toBe("renewal arrivals with a lognormal law (not phase-type)");
    expect(markovPathRefusal(parseScenario({ ...base, arrivals: { process: "batch", rate: 2, batchSize: { law: "geometric", mean: 2 }, admission: "partial" } }))).toBe("batch arrivals");
    expect(enginePathFor(parseScenario({ ...base, holding: { law: "lognormal", mean: 1, cv: 1 } }))).toBe("specialised");
    expect(enginePathFor(parseScenario({ ...base, arrivals: { process: "time-varying", profile: [{ duration: 1, rate: 8 }] } }))).toBe("reference");
  });

  it("records the path in every replication and in the result", async () => {
    const r = await runScenario(parseScenario({ servers: 5, arrivals: { process: "poisson", rate: 4 }, holding: exp1, run: { seed: 3, replications: 2, callsPerReplication: 2000 } }));
    expect(r.enginePath).toBe("markov");
    const s = await runScenario(parseScenario({ servers: 5, arrivals: { process: "poisson", rate: 4 }, holding: { law: "uniform", min: 0, max: 2 }, run: { seed: 3, replications: 2, callsPerReplication: 2000 } }));
    expect(s.enginePath).toBe("specialised");
  });
});

describe("Markov path against exact values (t at 99.9 %, see helpers.ts)", () => {
  it("M/M/30/30 at 20 E: call and time congestion against Erlang B", async () => {
    const reps = 20;
    const r = await runScenario(parseScenario({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: exp1, run: { seed: 11, replications: reps, callsPerReplication: 100_000, warmupCalls: 2_000 } }));
    expect(r.enginePath).toBe("markov");
    const exact = erlangBExact(30, 20);
    expectAgrees(r.callCongestion, exact, reps, "call congestion");
    expectAgrees(r.timeCongestion, exact, reps, "time congestion");
    expectAgrees(r.carriedTraffic, 20 * (1 - exact), reps, "carried traffic");
  });

  it("Engset, 40 sources, 10 servers: time and call congestion differ and both agree", async () => {
    const reps = 20;
    const r = await runScenario(parseScenario({ servers: 10, arrivals: { process: "finite-source", sources: 40, idleRate: 0.25 }, holding: { law: "exponential", mean: 1 }, run: { seed: 12, replications: reps, callsPerReplication: 60_000, warmupCalls: 1_000 } }));
    expect(r.enginePath).toBe("markov");
    const exact = engsetExact(40, 10, 0.25);
    expectAgrees(r.timeCongestion, exact.time, reps, "Engset time congestion");
    expectAgrees(r.callCongestion, exact.call, reps, "Engset call congestion");
  });

  it("overflow arrivals (primaries in the state): call and time congestion against the exact network chain", async () => {
    const reps = 20;
    const primaries = [{ traffic: 20, servers: 20 }, { traffic: 10, servers: 8 }];
    const r = await runScenario(parseScenario({ servers: 15, arrivals: { process: "overflow", primaries }, holding: exp1, run: { seed: 14, replications: reps, callsPerReplication: 40_000, warmupCalls: 2_000 } }));
    expect(r.enginePath).toBe("markov");
    // Independent: lib/teletraffic's overflow chain (itself checked against a dense solve), and Erlang B for the primaries.
    const exact = overflowLossSystem({ primaries, servers: 15 });
    expectAgrees(r.callCongestion, exact.blocking, reps, "call congestion");
    expectAgrees(r.timeCongestion, exact.timeCongestion, reps, "time congestion");
    expect(r.callCongestion.method).toMatch(/intensity estimator/);
  });

  it("phase-type renewal arrivals (hyperexponential, Erlang-3): call and time congestion against Palm–Takács", async () => {
    const reps = 20;
    for (const interarrival of [{ law: "hyperexponential", mean: 1 / 17, scv: 4 }, { law: "erlang", k: 3, mean: 1 / 8 }] as const) {
      const servers = interarrival.law === "erlang" ? 10 : 30;
      const r = await runScenario(parseScenario({ servers, arrivals: { process: "renewal", interarrival }, holding: exp1, run: { seed: 15, replications: reps, callsPerReplication: 40_000, warmupCalls: 2_000 } }));
      expect(r.enginePath).toBe("markov");
      const exact = renewalLossSystem({ servers, interarrival });
      expectAgrees(r.callCongestion, exact.callCongestion, reps, `${interarrival.law} call congestion`);
      expectAgrees(r.timeCongestion, exact.timeCongestion, reps, `${interarrival.law} time congestion`);
      expect(r.callCongestion.method).toMatch(/intensity estimator/);
    }
  });

  it("horizon runs and warm-up time are measured on the expected-sojourn clock", async () => {
    const reps = 10;
    const r = await runScenario(parseScenario({ servers: 8, arrivals: { process: "poisson", rate: 6 }, holding: { law: "exponential", mean: 0.5 }, run: { seed: 13, replications: reps, horizon: 20_000, warmupTime: 50 } }));
    expect(r.enginePath).toBe("markov");
    expect(r.warmupTime.min).toBeGreaterThanOrEqual(50);
    expectAgrees(r.timeCongestion, erlangBExact(8, 3), reps, "time congestion");
  });
});

describe("Markov path against the reference event loop (same model, different estimator)", () => {
  // The two runs use independent replications, so the difference of their estimates has standard
  // error sqrt(se1^2 + se2^2); with about 2(n-1) degrees of freedom (Welch; n-1 per side is the
  // conservative choice used here) |difference| <= t(0.9995, n-1) x that SE fails with probability
  // below 0.001 for a correct pair. Seeds are fixed, so the check is deterministic.
  const cases: Array<[string, ScenarioInput]> = [
    ["on-off arrivals", { servers: 20, arrivals: { process: "on-off", onRate: 30, meanOn: 1, meanOff: 1 }, holding: exp1, run: { seed: 21, replications: 16, callsPerReplication: 40_000, warmupCalls: 1_000 } }],
    ["three-phase MMPP", { servers: 15, arrivals: { process: "mmpp", rates: [5, 15, 30], switching: [[0, 1, 0.5], [0.7, 0, 0.3], [0.2, 2, 0]] }, holding: exp1, run: { seed: 22, replications: 16, callsPerReplication: 40_000, warmupCalls: 1_000 } }],
  ];
  for (const [name, input] of cases) {
    it(name, async () => {
      const s = parseScenario(input);
      const markov = await runScenario(s);
      expect(markov.enginePath).toBe("markov");
      // The reference loop through the dispatcher's override.
      const { createReplication } = await import("../../../lib/simulation/dispatch");
      const { aggregateReplications, buildResult } = await import("../../../lib/simulation");
      const stats = Array.from({ length: s.run.replications }, (_, i) => {
        const loop = createReplication(s, i, { warmupCalls: s.run.warmupCalls }, "reference");
        while (!loop.advance(1 << 20));
        return loop.stats();
      });
      const reference = buildResult(s, aggregateReplications(stats, s.servers), []);
      expect(reference.enginePath).toBe("reference");
      const bound = tQuantile(0.9995, s.run.replications - 1);
      for (const measure of ["callCongestion", "timeCongestion", "carriedTraffic"] as const) {
        const a = markov[measure];
        const b = reference[measure];
        const se = Math.hypot(a.standardError, b.standardError);
        expect(Math.abs(a.estimate - b.estimate), `${measure}: ${a.estimate} vs ${b.estimate}`).toBeLessThanOrEqual(bound * se);
      }
    });
  }
});

describe("Markov path coverage", () => {
  it("95 % intervals of call congestion cover the exact value for overflow and hyperexponential arrivals in 100 fixed-seed runs each", async () => {
    // Each count is Binomial(100, 0.95) for honest intervals; coverageRegion (helpers.ts) gives the
    // acceptance region an honest estimator leaves with probability below 0.002 per count.
    const { low, high } = coverageRegion(100);
    const primaries = [{ traffic: 8, servers: 8 }, { traffic: 4, servers: 3 }];
    const h2 = { law: "hyperexponential", mean: 1 / 6, scv: 4 } as const;
    const cases: Array<[string, ScenarioInput["arrivals"], number, number]> = [
      ["overflow", { process: "overflow", primaries }, 6, overflowLossSystem({ primaries, servers: 6 }).blocking],
      ["hyperexponential renewal", { process: "renewal", interarrival: h2 }, 9, renewalLossSystem({ servers: 9, interarrival: h2 }).callCongestion],
    ];
    for (const [name, arrivals, servers, exact] of cases) {
      let covered = 0;
      for (let seed = 1; seed <= 100; seed++) {
        const r = await runScenario(parseScenario({ servers, arrivals, holding: exp1, run: { seed: 500 + seed, replications: 12, callsPerReplication: 6_000, warmupCalls: 300 } }));
        if (r.callCongestion.ciLow <= exact && exact <= r.callCongestion.ciHigh) covered++;
      }
      expect(covered, `${name}: ${covered} of 100`).toBeGreaterThanOrEqual(low);
      expect(covered, `${name}: ${covered} of 100`).toBeLessThanOrEqual(high);
    }
  }, 120_000);

  it("95 % intervals of time congestion on M/M/10/10 at 7 E cover Erlang B in 100 fixed-seed runs", async () => {
    // With true coverage 0.95 the count of covering runs is Binomial(100, 0.95); the test accepts
    // counts whose lower-tail probability is at least 0.001 (computed below), so a correct
    // estimator fails with probability below 0.001 and these fixed seeds make it deterministic.
    const exact = erlangBExact(10, 7);
    let covered = 0;
    let coveredCalls = 0;
    const runs = 100;
    for (let seed = 1; seed <= runs; seed++) {
      const r = await runScenario(parseScenario({ servers: 10, arrivals: { process: "poisson", rate: 7 }, holding: exp1, run: { seed, replications: 8, callsPerReplication: 8_000, warmupCalls: 200 } }));
      if (r.timeCongestion.ciLow <= exact && exact <= r.timeCongestion.ciHigh) covered++;
      if (r.callCongestion.ciLow <= exact && exact <= r.callCongestion.ciHigh) coveredCalls++;
    }
    let minimum = 0;
    while (binomialCdf(minimum, runs, 0.95) < 0.001) minimum++;
    expect(covered, "time congestion").toBeGreaterThanOrEqual(minimum);
    expect(coveredCalls, "call congestion").toBeGreaterThanOrEqual(minimum);
    // Over-coverage would mean intervals too wide; the upper tail at the same level.
    let maximum = runs;
    while (maximum > 0 && 1 - binomialCdf(maximum - 1, runs, 0.95) < 0.001) maximum--;
    expect(covered).toBeLessThanOrEqual(maximum);
  }, 120_000);
});
