// Issue #11, section 1: every warning has a run that triggers it, an ordinary M/M/30/30 run carries
// none, and each edge case of the issue either covers the exact value or carries a warning.
import { describe, expect, it } from "vitest";
import { erlangB } from "../../../lib/teletraffic";
import { retrialLossSystem } from "../../../lib/teletraffic/markov-systems";
import { mser5, parseScenario, Replication, ReplicationJob, ScenarioError, type ScenarioInput, type SimulationResult } from "../../../lib/simulation/node";
import { unseenMeanShare, relaxationTime } from "../../../lib/simulation/diagnostics";
import { simulateReference } from "./helpers";

const exp1 = { law: "exponential", mean: 1 } as const;
const codes = (r: SimulationResult) => r.warnings.map((w) => w.code);
const mm = (servers: number, rate: number, run: object): ScenarioInput => ({ servers, arrivals: { process: "poisson", rate }, holding: exp1, run: { seed: 11, replications: 10, ...run } as ScenarioInput["run"] });

describe("an ordinary run carries no warning", () => {
  it("M/M/30/30 at 20 E, 10 x 20 000 calls after 1 000 warm-up calls: warnings = []", () => {
    const r = simulateReference(mm(30, 20, { callsPerReplication: 20_000, warmupCalls: 1_000 }));
    expect(r.warnings).toEqual([]);
    // The interval is two-sided and inside [0, 1].
    expect(r.callCongestion.upperBoundOnly).toBeUndefined();
    expect(r.callCongestion.ciLow).toBeGreaterThan(0);
  });

  it("the same with the automatic warm-up (MSER-5): warnings = []", () => {
    const r = simulateReference(mm(30, 20, { callsPerReplication: 20_000, warmup: "auto" }));
    expect(r.warnings).toEqual([]);
  });
});

describe("each warning is triggered by the run it describes", () => {
  it("no-event-observed: [0, upper] with the exact one-sided bound 1 - (1 - c)^(1/n), for every probability", () => {
    // 60 servers at 5 E: Erlang B is about 1e-36, so nothing is ever refused.
    const r = simulateReference({
      ...mm(60, 5, { callsPerReplication: 2_000, warmupCalls: 100 }),
      waitingPositions: 2,
    });
    expect(r.callCongestion.upperBoundOnly).toBe(true);
    expect(r.callCongestion.ciLow).toBe(0);
    expect(r.callCongestion.ciHigh).toBeCloseTo(1 - Math.pow(0.05, 1 / r.calls), 15);
    const flagged = r.warnings.filter((w) => w.code === "no-event-observed").map((w) => w.measure);
    expect(flagged).toEqual(expect.arrayContaining(["callCongestion", "timeCongestion", "lossProbability", "waitingProbability", "abandonmentProbability"]));
    for (const m of ["timeCongestion", "lossProbability", "waitingProbability"] as const) expect(r[m]!.ciHigh, m).toBeGreaterThan(0);
  });

  it("no-event-observed covers the retrial measures too (loss, attempt congestion)", () => {
    const r = simulateReference({ ...mm(60, 5, { callsPerReplication: 2_000, warmupCalls: 100 }), retrials: { persistence: 0.5, delay: exp1 } });
    const flagged = r.warnings.filter((w) => w.code === "no-event-observed").map((w) => w.measure);
    expect(flagged).toEqual(expect.arrayContaining(["callCongestion", "lossProbability", "attemptCongestion"]));
  });

  it("infinite-variance: Pareto holding with shape <= 2", () => {
    const r = simulateReference({ ...mm(30, 20, { callsPerReplication: 20_000, warmupCalls: 1_000 }), holding: { law: "pareto", mean: 1, shape: 1.9 } });
    expect(codes(r)).toContain("infinite-variance");
    expect(r.warnings.find((w) => w.code === "infinite-variance")!.message).toMatch(/^holding: /);
  });

  it("heavy-tail: lognormal cv 10 holding with 2 000 calls a replication (draws rarer than 1 in 2 000 carry > 1 % of the mean)", () => {
    // Lognormal: the share is P(Z > z_{1-1/n} - sigma), sigma^2 = ln(1 + cv^2) = ln 101; at n = 2000,
    // z = 3.29, so the share is P(Z > 1.14) = 0.127 (normal table).
    expect(unseenMeanShare({ law: "lognormal", mean: 1, cv: 10 }, 2000)).toBeCloseTo(0.127, 2);
    const r = simulateReference({ ...mm(30, 20, { callsPerReplication: 2_000, warmupCalls: 200 }), holding: { law: "lognormal", mean: 1, cv: 10 } });
    expect(codes(r)).toContain("heavy-tail");
  });

  it("unseen-share criterion: exponential (1 + ln n)/n and Pareto n^(1/a - 1) in closed form", () => {
    expect(unseenMeanShare(exp1, 1000)).toBeCloseTo((1 + Math.log(1000)) / 1000, 12);
    // Gamma with cv 1 is the exponential: the incomplete-gamma route must agree with the closed form.
    expect(unseenMeanShare({ law: "gamma", mean: 1, cv: 1 }, 1000)).toBeCloseTo((1 + Math.log(1000)) / 1000, 8);
    expect(unseenMeanShare({ law: "pareto", mean: 1, shape: 1.5 }, 1e6)).toBeCloseTo(Math.pow(1e6, 1 / 1.5 - 1), 12);
    // Weibull shape 1 is the exponential too.
    expect(unseenMeanShare({ law: "weibull", shape: 1, scale: 1 }, 1000)).toBeCloseTo((1 + Math.log(1000)) / 1000, 10);
  });

  it("run-too-short: 500 calls at 20 E measure 25 holding times, below 100 relaxation times", () => {
    expect(relaxationTime(parseScenario(mm(30, 20, { callsPerReplication: 500 }))).time).toBe(1);
    const r = simulateReference(mm(30, 20, { callsPerReplication: 500, warmupCalls: 100 }));
    expect(codes(r)).toContain("run-too-short");
  });

  it("warmup-at-bound: a 10 000-server group filling from empty is still rising when MSER-5's pilot is half done", () => {
    // 9 000 E, mean holding 1: the busy count rises like 9000 (1 - e^-t); 20 000 calls span 2.2 holding
    // times, so at half the pilot it is still at 67 % and MSER-5 can only cut at its bound.
    const r = simulateReference({ ...mm(10_000, 9_000, { callsPerReplication: 20_000, warmup: "auto" }), run: { seed: 3, replications: 3, callsPerReplication: 20_000, warmup: "auto" } });
    expect(codes(r)).toContain("warmup-at-bound");
  });

  it("still-growing and inconsistent-result: persistence 0.9999 at twice the capacity", () => {
    const r = simulateReference({ ...mm(10, 20, { replications: 4, callsPerReplication: 10_000, warmupCalls: 1_000 }), retrials: { persistence: 0.9999, delay: exp1 } });
    expect(codes(r)).toEqual(expect.arrayContaining(["still-growing", "inconsistent-result", "run-too-short"]));
    expect(r.warnings.find((w) => w.code === "still-growing")!.measure).toBe("meanRetrying");
  });
});

describe("the edge cases of issue #11 cover the exact value or carry a warning", () => {
  const covers = (m: { ciLow: number; ciHigh: number }, exact: number) => m.ciLow <= exact && exact <= m.ciHigh;

  it("Pareto holding, shape 1.2: the estimate misses Erlang B (insensitivity) and says so", () => {
    const input: ScenarioInput = { ...mm(30, 24, { callsPerReplication: 50_000, warmupCalls: 2_000 }), holding: { law: "pareto", mean: 1, shape: 1.2 } };
    const r = simulateReference(input);
    const exact = erlangB(30, 24); // Erlang B holds for any holding law with the same mean (Sevastyanov 1957)
    expect(covers(r.callCongestion, exact) || codes(r).includes("infinite-variance")).toBe(true);
    expect(codes(r)).toContain("infinite-variance");
  });

  it("50 000 servers on a short run: not [0, 0], but a one-sided bound and the run-too-short warning", () => {
    const r = simulateReference({ ...mm(50_000, 49_000, { callsPerReplication: 20_000 }), run: { seed: 1, replications: 5, callsPerReplication: 20_000 } });
    const exact = erlangB(50_000, 49_000);
    expect(r.callCongestion.ciHigh).toBeGreaterThan(0);
    expect(covers(r.callCongestion, exact) || codes(r).includes("run-too-short")).toBe(true);
    expect(codes(r)).toContain("run-too-short");
  });

  it("retrials with persistence 0.99 at twice the capacity: the loss interval covers the exact chain's 0.5005", () => {
    // Exact 2-D chain (servers x orbit, truncated where the neglected mass is below 1e-12):
    // lib/teletraffic/markov-systems.ts, Falin & Templeton, Retrial Queues, 1997, ch. 1-2.
    const exact = retrialLossSystem({ servers: 10, traffic: 20, persistence: 0.99, meanRetryDelay: 1, waitingPositions: 0, meanHolding: 1 } as Parameters<typeof retrialLossSystem>[0]).lossProbability;
    expect(exact).toBeCloseTo(0.5005, 4); // the figure
    const r = simulateReference({ ...mm(10, 20, { replications: 5, callsPerReplication: 50_000, warmupCalls: 20_000 }), retrials: { persistence: 0.99, delay: exp1 } });
    expect(covers(r.lossProbability!, exact) || r.warnings.length > 0).toBe(true);
  });

  it("persistence 0.9999: the counted loss contradicts the carried traffic, and the result says so", () => {
    const r = simulateReference({ ...mm(10, 20, { replications: 4, callsPerReplication: 10_000, warmupCalls: 1_000 }), retrials: { persistence: 0.9999, delay: exp1 } });
    // Carried traffic is at most 10 of 20 E offered, so the loss is at least 0.5 (Little's law).
    expect(r.lossProbability!.ciHigh).toBeLessThan(0.5);
    expect(codes(r)).toContain("inconsistent-result");
  });

  it("probability intervals stay inside [0, 1]: near-certain refusal at 100x the capacity", () => {
    const r = simulateReference(mm(1, 100, { callsPerReplication: 200, warmupCalls: 10 }));
    for (const m of [r.callCongestion, r.callCongestionDirect, r.timeCongestion]) {
      expect(m.ciLow).toBeGreaterThanOrEqual(0);
      expect(m.ciHigh).toBeLessThanOrEqual(1);
    }
  });
});

describe("the automatic warm-up watches every state that can drift", () => {
  it("retrials with slow retries: the orbit settles later than the busy servers, and MSER-5 waits for it", () => {
    const s = parseScenario({
      servers: 10,
      arrivals: { process: "poisson", rate: 9 },
      holding: exp1,
      retrials: { persistence: 0.9, delay: { law: "exponential", mean: 20 } },
      run: { seed: 2, replications: 2, callsPerReplication: 20_000, warmup: "auto" },
    });
    const pilot = new Replication(s, 0, { warmupCalls: 0, traceEvery: 4, generalLoop: true }); // floor(20 000 / 5 000)
    while (!pilot.advance(Number.MAX_SAFE_INTEGER));
    const averages = (integral: number[]) => integral.slice(1).map((v, i) => (v - integral[i]) / (pilot.traceTime[i + 1] - pilot.traceTime[i]));
    const busyCut = mser5(averages(pilot.traceBusy));
    const orbitCut = mser5(averages(pilot.traceOrbit));
    expect(orbitCut).toBeGreaterThan(busyCut); // at this seed: 125 against 75 observations
    const job = new ReplicationJob(s, 0, "reference");
    while (!job.advance(Number.MAX_SAFE_INTEGER));
    expect(job.stats().warmupCalls).toBe(pilot.traceCalls[Math.max(busyCut, orbitCut)]);
  });
});

describe("inputs and generators at the edges", () => {
  it("seed 2^53 is refused with the allowed range in the message", () => {
    expect(() => parseScenario(mm(1, 1, { seed: 2 ** 53, callsPerReplication: 10 }))).toThrow(ScenarioError);
    expect(() => parseScenario(mm(1, 1, { seed: 2 ** 53, callsPerReplication: 10 }))).toThrow(/^run\.seed: must be an integer from 0 to 9007199254740991 \(2\^53 - 1\)/);
    expect(() => parseScenario(mm(1, 1, { seed: 2 ** 53 - 1, callsPerReplication: 10 }))).not.toThrow();
  });

  it("a time-varying profile with near-empty stretches jumps whole cycles: 100 calls in one short slice", () => {
    // 1e-9 calls per cycle: the old segment walk needed ~1e9 cycles (2e9 loop turns) per arrival.
    const s = parseScenario({
      servers: 2,
      arrivals: { process: "time-varying", profile: [{ duration: 1, rate: 1e-9 }, { duration: 1, rate: 0 }] },
      holding: exp1,
      run: { seed: 5, replications: 2, callsPerReplication: 100 },
    });
    const r = new Replication(s, 0);
    let slices = 0;
    while (!r.advance(50)) slices++; // returns between slices: a caller can cancel
    expect(slices).toBeGreaterThan(0);
    const st = r.stats();
    expect(st.calls).toBe(100);
    // The compensator of 100 arrivals (each draw a unit exponential on the integrated-rate clock) is
    // a Gamma(100, 1) sum: within 100 +- 5 x 10 with overwhelming probability.
    expect(Math.abs(st.intensityIntegral - 100)).toBeLessThan(50);
    expect(st.time).toBeGreaterThan(1e10);
  });
});
