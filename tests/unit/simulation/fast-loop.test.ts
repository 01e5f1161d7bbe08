// The specialised loop (fast-loop.ts) against the reference loop (engine.ts). On the reference
// streams it must give bit-identical statistics, every field of ReplicationStats included; on
// the ziggurat streams it is a different sample path of the same model, compared statistically.
import { describe, expect, it } from "vitest";
import { FastReplication, fastLoopRefusal } from "../../../lib/simulation/fast-loop";
import { parseScenario, Replication, type ReplicationStats, type ScenarioInput } from "../../../lib/simulation";

const exp1 = { law: "exponential", mean: 1 } as const;
const calls = { seed: 31, replications: 2, callsPerReplication: 20_000, warmupCalls: 2_000 };

/** One scenario of every shape the specialised loop runs (arrival kinds x holding laws x waiting x retrials x warm-up kinds). */
const shapes: Array<[string, ScenarioInput]> = [
  ["poisson, exponential", { servers: 7, arrivals: { process: "poisson", rate: 6 }, holding: exp1, run: calls }],
  ["poisson, lognormal", { servers: 30, arrivals: { process: "poisson", rate: 25 }, holding: { law: "lognormal", mean: 1, cv: 1.5 }, run: calls }],
  ["poisson, deterministic holding (ties)", { servers: 3, arrivals: { process: "poisson", rate: 2 }, holding: { law: "deterministic", value: 1 }, run: calls }],
  ["renewal H2 arrivals, gamma holding", { servers: 10, arrivals: { process: "renewal", interarrival: { law: "hyperexponential", mean: 0.125, scv: 4 } }, holding: { law: "gamma", mean: 1, cv: 0.7 }, run: calls }],
  ["renewal erlang arrivals, weibull holding", { servers: 10, arrivals: { process: "renewal", interarrival: { law: "erlang", k: 3, mean: 0.12 } }, holding: { law: "weibull", mean: 1, cv: 1.3 }, run: calls }],
  ["on-off", { servers: 20, arrivals: { process: "on-off", onRate: 30, meanOn: 1, meanOff: 1 }, holding: exp1, run: calls }],
  ["mmpp 3 phases, pareto holding", { servers: 15, arrivals: { process: "mmpp", rates: [5, 15, 30], switching: [[0, 1, 0.5], [0.7, 0, 0.3], [0.2, 2, 0]] }, holding: { law: "pareto", mean: 1, shape: 2.5 }, run: calls }],
  ["batch geometric, partial", { servers: 12, arrivals: { process: "batch", rate: 3, batchSize: { law: "geometric", mean: 3 }, admission: "partial" }, holding: exp1, run: calls }],
  ["batch uniform, all-or-nothing, retrials", { servers: 12, arrivals: { process: "batch", rate: 3, batchSize: { law: "uniform", min: 1, max: 5 }, admission: "all-or-nothing" }, holding: exp1, retrials: { persistence: 0.5, delay: exp1, maxAttempts: 4 }, run: calls }],
  ["overflow, two primaries (one with 0 servers)", { servers: 8, arrivals: { process: "overflow", primaries: [{ traffic: 6, servers: 5 }, { traffic: 2, servers: 0 }] }, holding: { law: "uniform", min: 0.5, max: 1.5 }, run: calls }],
  ["finite sources, waiting and patience", { servers: 5, waitingPositions: 3, patience: { law: "exponential", mean: 0.5 }, arrivals: { process: "finite-source", sources: 20, idleRate: 0.4 }, holding: exp1, run: calls }],
  ["retrials, lognormal delay", { servers: 10, arrivals: { process: "poisson", rate: 10 }, holding: exp1, retrials: { persistence: 0.8, delay: { law: "lognormal", mean: 0.5, cv: 0.8 }, maxAttempts: 6 }, run: calls }],
  ["waiting, no patience, horizon run with warm-up time", { servers: 4, waitingPositions: 6, arrivals: { process: "poisson", rate: 3.5 }, holding: { law: "erlang", k: 2, mean: 1 }, run: { seed: 5, replications: 2, horizon: 3_000, warmupTime: 100 } }],
  ["auto warm-up (MSER-5 trace)", { servers: 12, waitingPositions: 2, patience: { law: "gamma", mean: 2, cv: 1.2 }, arrivals: { process: "on-off", onRate: 18, meanOn: 2, meanOff: 1 }, holding: { law: "lognormal", mean: 1, cv: 1.2 }, retrials: { persistence: 0.6, delay: { law: "erlang", k: 2, mean: 3 }, maxAttempts: 5 }, run: { seed: 42, replications: 2, callsPerReplication: 20_000, warmup: "auto" } }],
];

function runToEnd(r: { advance(n: number): boolean; stats(): ReplicationStats }, slice: number): ReplicationStats {
  while (!r.advance(slice));
  return r.stats();
}

describe("specialised loop on the reference streams: bit-identical to engine.ts", () => {
  for (const [name, input] of shapes) {
    it(name, () => {
      const s = parseScenario(input);
      expect(fastLoopRefusal(s)).toBeUndefined();
      for (const index of [0, 1]) {
        // A pilot-style trace where the reference job would use one.
        const options = s.run.warmup === "auto" ? { warmupCalls: 0, traceEvery: 20 } : {};
        const reference = new Replication(s, index, { ...options, generalLoop: true });
        const fast = new FastReplication(s, index, { ...options, streams: "reference" });
        // Odd slices exercise resuming mid-run.
        const expected = runToEnd(reference, 1_000_000);
        const got = runToEnd(fast, 777);
        expect({ ...got, path: undefined }).toEqual({ ...expected, path: undefined });
        // Every field the reference fills is filled (a counter added there and missed here fails).
        expect(Object.keys(got).sort()).toEqual([...Object.keys(expected), "path"].filter((k, i, a) => a.indexOf(k) === i).sort());
        if (options.traceEvery) {
          expect(fast.traceTime).toEqual(reference.traceTime);
          expect(fast.traceBusy).toEqual(reference.traceBusy);
          expect(fast.traceOrbit).toEqual(reference.traceOrbit);
          expect(fast.traceQueue).toEqual(reference.traceQueue);
          expect(fast.traceCalls).toEqual(reference.traceCalls);
        }
      }
    });
  }
});

describe("specialised loop on the ziggurat streams: the same model, checked statistically", () => {
  it("the dispatcher runs it with ziggurat streams (they differ from the reference draws)", () => {
    const s = parseScenario(shapes[1][1]);
    const zig = runToEnd(new FastReplication(s, 0), 1 << 20);
    const ref = runToEnd(new FastReplication(s, 0, { streams: "reference" }), 1 << 20);
    expect(zig.busyIntegral).not.toBe(ref.busyIntegral);
  });

  it("M/G/30/30 with lognormal holding (cv 1.5) at 25 E: call and time congestion agree with Erlang B (insensitivity)", async () => {
    // Erlang B is insensitive to the holding law (Sevastyanov 1957); exact value by the recursion
    // B(n) = A B(n-1) / (n + A B(n-1)) computed here. Bound: t(0.9995, n-1) x SE (see helpers.ts).
    let b = 1;
    for (let n = 1; n <= 30; n++) b = (25 * b) / (n + 25 * b);
    const { runScenario } = await import("../../../lib/simulation/node");
    const { expectAgrees } = await import("./helpers");
    const reps = 16;
    const r = await runScenario(parseScenario({ ...shapes[1][1], run: { seed: 77, replications: reps, callsPerReplication: 60_000, warmupCalls: 2_000 } }));
    expect(r.enginePath).toBe("specialised");
    expectAgrees(r.callCongestion, b, reps, "call congestion");
    expectAgrees(r.timeCongestion, b, reps, "time congestion");
  });

  it("retrials with lognormal delays: loss, attempts per call and carried traffic agree with the reference loop", async () => {
    // Independent replications on each side: |difference| <= t(0.9995, n-1) x sqrt(se1^2 + se2^2)
    // fails with probability below 0.001 for a correct pair (conservative degrees of freedom).
    const { default: tQuantile } = await import("@stdlib/stats-base-dists-t-quantile");
    const { aggregateReplications, buildResult } = await import("../../../lib/simulation");
    const s = parseScenario({ ...shapes[11][1], run: { seed: 78, replications: 12, callsPerReplication: 40_000, warmupCalls: 2_000 } });
    const results = [true, false].map((zig) => {
      const stats = Array.from({ length: s.run.replications }, (_, i) =>
        runToEnd(zig ? new FastReplication(s, i) : new Replication(s, i, { generalLoop: true }), 1 << 20),
      );
      return buildResult(s, aggregateReplications(stats, s.servers), []);
    });
    const t = tQuantile(0.9995, s.run.replications - 1);
    for (const measure of ["callCongestion", "lossProbability", "attemptsPerCall", "carriedTraffic", "meanRetrying"] as const) {
      const a = results[0][measure]!;
      const b = results[1][measure]!;
      expect(Math.abs(a.estimate - b.estimate), `${measure}: ${a.estimate} vs ${b.estimate}`).toBeLessThanOrEqual(t * Math.hypot(a.standardError, b.standardError));
    }
  });
});
