// Sweep definitions (the zod schema the API validates with), point expansion with common random
// numbers, formula sizing, the holds/breaks verdict and the dimensioning search.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseScenario } from "@/lib/simulation";
import { expandSweep, gridOf, nextProbe, parseSweepDefinition, SweepDefinitionError, verdictOf, type PointRun, type Probe } from "@/lib/sweeps";

const base = parseScenario({
  servers: 10,
  arrivals: { process: "poisson", rate: 4 },
  holding: { law: "exponential", mean: 2 },
  run: { seed: 42, replications: 4, callsPerReplication: 1000 },
});

/** Smallest N with B(N, A) <= target by the Erlang B recursion B(n) = A B(n-1) / (n + A B(n-1)), computed here. */
function erlangBServers(a: number, target: number): number {
  let b = 1;
  let n = 0;
  while (b > target) {
    n++;
    b = (a * b) / (n + a * b);
  }
  return n;
}

describe("sweep definitions", () => {
  it("the short form {parameter, values} is a one-parameter sweep", () => {
    expect(parseSweepDefinition({ parameter: "offeredTraffic", values: [4, 6] })).toEqual({ kind: "sweep", parameter: "offeredTraffic", values: [4, 6] });
  });
  it("bad definitions name the field", () => {
    const refusal = (json: unknown) => {
      try {
        parseSweepDefinition(json);
      } catch (error) {
        expect(error).toBeInstanceOf(SweepDefinitionError);
        return { message: (error as Error).message, field: (error as SweepDefinitionError).field };
      }
      throw new Error("accepted");
    };
    expect(refusal({ parameter: "colour", values: [1] }).field).toBe("parameter");
    expect(refusal({ parameter: "servers", values: [3, 3.5] })).toEqual({ message: "values[1]: servers must be a whole number", field: "values.1" });
    expect(refusal({ parameter: "servers", values: [3, 3] }).message).toMatch(/distinct/);
    expect(refusal({ kind: "grid", x: { parameter: "servers", values: [1] }, y: { parameter: "peakedness", values: [1] }, targetBlocking: 0.01 }).field).toBe("x.parameter");
    expect(refusal({ kind: "dimensioning", targetBlocking: 1.5 }).field).toBe("targetBlocking");
    expect(refusal({ kind: "spiral" }).field).toBe("kind");
  });
  it("points keep the base seed (common random numbers) and name the bad point", () => {
    const points = expandSweep(base, parseSweepDefinition({ parameter: "offeredTraffic", values: [4, 8, 12] }));
    expect(points.map((p) => p.scenario.run.seed)).toEqual([42, 42, 42]);
    expect(points.map((p) => p.scenario.arrivals)).toEqual([4, 8, 12].map((a) => ({ process: "poisson", rate: a / 2 })));
    expect(() => expandSweep(base, parseSweepDefinition({ parameter: "retryPersistence", values: [0.5] }))).toThrow(/values.0 \(retryPersistence = 0.5\): retryPersistence: the scenario has no repeated attempts/);
  });
  it("a grid sizes each cell with Erlang B at its offered traffic", () => {
    const def = parseSweepDefinition({ kind: "grid", x: { parameter: "offeredTraffic", values: [5, 20] }, y: { parameter: "peakedness", values: [1, 2] }, targetBlocking: 0.01 });
    const points = expandSweep(base, def);
    expect(points.map((p) => p.point)).toEqual([0, 1, 2, 3]);
    expect(points.map((p) => p.values.servers)).toEqual([5, 20, 5, 20].map((a) => erlangBServers(a, 0.01)));
    expect(points.map((p) => p.scenario.servers)).toEqual(points.map((p) => p.values.servers));
    expect(points[3].scenario.arrivals).toMatchObject({ process: "batch", batchSize: { law: "geometric", mean: 2 } });
  });
  it("a dimensioning search starts with one probe at the formula's N, at the stated confidence", () => {
    const [probe] = expandSweep(base, parseSweepDefinition({ kind: "dimensioning", targetBlocking: 0.02, confidence: 0.99 }));
    expect(probe.values.servers).toBe(erlangBServers(8, 0.02));
    expect(probe.scenario.run.confidence).toBe(0.99);
  });
});

describe("verdicts and the dimensioning search", () => {
  it("holds when the whole interval meets the target, breaks when it all misses, else inconclusive", () => {
    expect(verdictOf({ ciLow: 0.005, ciHigh: 0.01 }, 0.01)).toBe("holds");
    expect(verdictOf({ ciLow: 0.011, ciHigh: 0.02 }, 0.01)).toBe("breaks");
    expect(verdictOf({ ciLow: 0.008, ciHigh: 0.012 }, 0.01)).toBe("inconclusive");
  });

  /** Runs the search against a monotone truth: N meets the target iff N >= answer. */
  function search(formulaN: number, answer: number, maxProbes = 60) {
    const probes: Probe[] = [];
    for (;;) {
      const d = nextProbe(formulaN, probes, maxProbes, 100_000);
      if (d.kind !== "probe") return { decision: d, probes };
      probes.push({ servers: d.servers, meets: d.servers >= answer });
    }
  }

  it("finds the smallest meeting N from above and from below, bracketing in doubling steps", () => {
    const up = search(12, 17);
    expect(up.decision).toEqual({ kind: "done", servers: 17 });
    expect(up.probes.map((p) => p.servers)).toEqual([12, 13, 15, 19, 17, 16]);
    expect(search(30, 17).decision).toEqual({ kind: "done", servers: 17 });
    expect(search(1, 1).decision).toEqual({ kind: "done", servers: 1 });
  });

  it("always ends at the true answer within 2 log2(distance) + 4 probes (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5000 }), fc.integer({ min: 1, max: 5000 }), (formulaN, answer) => {
        const { decision, probes } = search(formulaN, answer);
        expect(decision).toEqual({ kind: "done", servers: answer });
        expect(probes.length).toBeLessThanOrEqual(2 * Math.log2(Math.abs(formulaN - answer) + 1) + 4);
      }),
    );
  });

  it("stops with a reason when the probes run out", () => {
    expect(search(10, 4000, 5).decision).toMatchObject({ kind: "exhausted", message: "no answer within 5 probes" });
  });

  it("a grid summary counts verdicts and gives the margin to the target", () => {
    const def = parseSweepDefinition({ kind: "grid", x: { parameter: "offeredTraffic", values: [5] }, y: { parameter: "peakedness", values: [1, 2] }, targetBlocking: 0.01 });
    if (def.kind !== "grid") throw new Error("grid expected");
    const run = (point: number, estimate: number, ciLow: number, ciHigh: number): PointRun => ({
      runId: `r${point}`,
      point,
      values: { offeredTraffic: 5, peakedness: point + 1, servers: 11 },
      status: "succeeded",
      result: { callCongestion: { estimate, ciLow, ciHigh, standardError: 0, halfWidth: 0 } } as never,
      references: [],
      error: null,
      partial: false,
    });
    const map = gridOf(def, [run(1, 0.03, 0.025, 0.035), run(0, 0.008, 0.006, 0.0095)]);
    expect(map.counts).toEqual({ holds: 1, breaks: 1, inconclusive: 0 });
    expect(map.cells.map((c) => [c.y, c.verdict, c.margin])).toEqual([
      [1, "holds", 0.01 - 0.008],
      [2, "breaks", 0.01 - 0.03],
    ]);
  });
});
