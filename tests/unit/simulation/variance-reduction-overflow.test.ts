// Issue #11, section 2: coverage of the variance-reduced call congestion on peaky overflow traffic,
// where each primary group's overflow count (mean known exactly by PASTA: Erlang B of the primary)
// is a control variate. Split from variance-reduction.test.ts to keep each file short.
import { describe, expect, it } from "vitest";
import { overflowLossSystem } from "../../../lib/teletraffic";
import { coverageCount as coverage, coverageRegion as region } from "./helpers";

describe("coverage of the variance-reduced call congestion on overflow traffic", () => {
  it("peaky overflow traffic (primary overflow counts among 6 controls, 32 replications): covers the exact overflow chain", () => {
    const runs = 300;
    const { low, high, fail, passNarrow } = region(runs);
    expect(fail).toBeLessThan(0.002);
    expect(passNarrow).toBeLessThan(0.01);
    const primaries = [
      { traffic: 8, servers: 8 },
      { traffic: 4, servers: 4 },
    ];
    const exact = overflowLossSystem({ primaries, servers: 5 }).blocking;
    const { covered, methods } = coverage(runs, exact, (seed) => ({
      servers: 5,
      arrivals: { process: "overflow", primaries },
      holding: { law: "exponential", mean: 1 },
      run: { seed, replications: 32, callsPerReplication: 600, warmupCalls: 100 },
    }));
    expect([...methods][0]).toMatch(/primary 1 overflow, primary 2 overflow/);
    // At these seeds (reference loop): on-off 380 of 400, overflow 292 of 300, renewal 289 of 300.
    expect(covered, `covered ${covered} of ${runs}`).toBeGreaterThanOrEqual(low);
    expect(covered, `covered ${covered} of ${runs}`).toBeLessThanOrEqual(high);
  }, 60_000);

});
