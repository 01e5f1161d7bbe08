// Reproducibility: one stream per (seed, replication, substream), results combined in index order.
import { describe, expect, it } from "vitest";
import { parseScenario, Replication, runReplication, runScenario } from "../../../lib/simulation/node";

const mixed = parseScenario({
  servers: 12,
  waitingPositions: 3,
  patience: { law: "exponential", mean: 2 },
  arrivals: { process: "on-off", onRate: 18, meanOn: 2, meanOff: 1 },
  holding: { law: "lognormal", mean: 1, cv: 1.2 },
  retrials: { persistence: 0.6, delay: { law: "erlang", k: 2, mean: 3 }, maxAttempts: 5 },
  run: { seed: 42, replications: 6, callsPerReplication: 20_000, warmup: "auto" },
});

describe("determinism", () => {
  it("same scenario and seed: identical JSON with 1 and 2 worker threads", async () => {
    const one = await runScenario(mixed, { threads: 1 });
    const two = await runScenario(mixed, { threads: 2 });
    expect(JSON.stringify(two)).toBe(JSON.stringify(one));
    expect(one.events).toBeGreaterThan(0);
  }, 60_000);

  it("a precision target stops at the same replication with 1 and 3 threads", async () => {
    const s = parseScenario({
      servers: 10,
      arrivals: { process: "poisson", rate: 8 },
      holding: { law: "deterministic", value: 1 },
      run: { seed: 5, replications: 3, callsPerReplication: 5_000, precision: { relativeHalfWidth: 0.03, maxCalls: 400_000 } },
    });
    const one = await runScenario(s, { threads: 1 });
    const three = await runScenario(s, { threads: 3 });
    expect(JSON.stringify(three)).toBe(JSON.stringify(one));
    expect(one.replications).toBeGreaterThan(3);
    expect(one.callCongestion.halfWidth / one.callCongestion.estimate).toBeLessThanOrEqual(0.03);
  }, 60_000);

  it("runReplication is pure: the same (scenario, index) twice gives identical statistics", () => {
    expect(runReplication(mixed, 3)).toEqual(runReplication(mixed, 3));
  });

  it("different seeds and different replication indices give different results", async () => {
    const other = parseScenario({ ...mixed, run: { ...mixed.run, seed: 43 } });
    const a = await runScenario(mixed);
    const b = await runScenario(other);
    expect(b.callCongestion.estimate).not.toBe(a.callCongestion.estimate);
    expect(b.events).not.toBe(a.events);
    expect(runReplication(mixed, 0).blockedFirst).not.toBe(runReplication(mixed, 1).blockedFirst);
  });

  it("the Poisson/exponential fast path and the general event loop give bit-identical statistics", () => {
    for (const run of [
      { seed: 9, replications: 2, callsPerReplication: 30_000, warmupCalls: 1_000 },
      { seed: 9, replications: 2, horizon: 2_000, warmupTime: 50 },
    ]) {
      const s = parseScenario({ servers: 7, arrivals: { process: "poisson", rate: 6 }, holding: { law: "exponential", mean: 1 }, run });
      const fast = new Replication(s, 1);
      const general = new Replication(s, 1, { generalLoop: true });
      // Small slices also exercise resuming mid-run.
      while (!fast.advance(777));
      while (!general.advance(1_000_000));
      expect(fast.stats()).toEqual(general.stats());
    }
  });
});
