import { describe, expect, it } from "vitest";
import { parseScenario, runScenario, SimulationCancelledError } from "../../../lib/simulation/node";

const long = (threads: number) =>
  parseScenario({
    servers: 30,
    arrivals: { process: "poisson", rate: 20 },
    holding: { law: "lognormal", mean: 1, cv: 1 },
    run: { seed: 1, replications: threads * 2, callsPerReplication: 50_000_000 },
  });

describe("progress and cancellation", () => {
  it("progress fractions increase strictly and end at exactly 1", async () => {
    const fractions: number[] = [];
    const s = parseScenario({
      servers: 10,
      arrivals: { process: "poisson", rate: 8 },
      holding: { law: "gamma", mean: 1, cv: 2 },
      run: { seed: 2, replications: 4, callsPerReplication: 300_000 },
    });
    await runScenario(s, { onProgress: (f) => fractions.push(f) });
    expect(fractions.length).toBeGreaterThan(4); // several slices per replication
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThan(fractions[i - 1]);
    expect(fractions[0]).toBeGreaterThan(0);
    expect(fractions.at(-1)).toBe(1);
  });

  for (const threads of [1, 2]) {
    it(`an AbortSignal stops a long run with a cancelled error (${threads} thread${threads > 1 ? "s" : ""})`, async () => {
      const controller = new AbortController();
      let last = 0;
      const promise = runScenario(long(threads), {
        threads,
        signal: controller.signal,
        onProgress: (f) => {
          last = f;
          if (f > 0.001) controller.abort();
        },
      });
      await expect(promise).rejects.toBeInstanceOf(SimulationCancelledError);
      await expect(promise).rejects.toThrow("simulation cancelled");
      // Stopped within a few slices of the abort: far from the 100 M-call end.
      expect(last).toBeLessThan(0.05);
    }, 60_000);
  }

  it("an already aborted signal rejects at once", async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(runScenario(long(1), { signal: controller.signal })).rejects.toBeInstanceOf(SimulationCancelledError);
  });
});
