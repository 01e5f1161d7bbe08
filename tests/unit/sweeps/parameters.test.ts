// The sweep parameter registry: every apply reads back as the value asked for and keeps what it
// promises to keep (above all the mean call rate); refusals name the parameter and say why.
import { describe, expect, it } from "vitest";
import { parseScenario, type Scenario, type ScenarioInput } from "@/lib/simulation";
import { lawScv, sweepParameters, SweepParameterError, trafficAtGroup } from "@/lib/sweeps";
import { meanCallRate } from "@/lib/sweeps/parameters";

const run = { seed: 1, replications: 4, callsPerReplication: 1000 };
const base = (arrivals: ScenarioInput["arrivals"], extra: Partial<ScenarioInput> = {}): Scenario =>
  parseScenario({ servers: 10, arrivals, holding: { law: "exponential", mean: 2 }, run, ...extra });

const processes: Record<string, Scenario> = {
  poisson: base({ process: "poisson", rate: 3 }),
  mmpp: base({ process: "mmpp", rates: [1, 6], switching: [[0, 0.5], [1, 0]] }),
  "on-off": base({ process: "on-off", onRate: 8, meanOn: 1, meanOff: 2 }),
  renewal: base({ process: "renewal", interarrival: { law: "gamma", mean: 0.5, cv: 1.4 } }),
  batch: base({ process: "batch", rate: 1, batchSize: { law: "geometric", mean: 2.5 } }),
  overflow: base({ process: "overflow", primaries: [{ traffic: 5, servers: 4 }, { traffic: 3, servers: 2 }] }),
  "finite-source": base({ process: "finite-source", sources: 30, idleRate: 0.05 }),
  "time-varying": base({ process: "time-varying", profile: [{ duration: 1, rate: 2 }, { duration: 3, rate: 4 }] }),
};

const close = (a: number, b: number, rel = 1e-9) => expect(Math.abs(a - b)).toBeLessThanOrEqual(rel * Math.abs(b));

describe("offered traffic", () => {
  for (const [name, s] of Object.entries(processes)) {
    it(`${name}: reads back the traffic applied, and the result is a valid scenario`, () => {
      const p = sweepParameters.offeredTraffic;
      const applied = parseScenario(p.apply(s, 7.5));
      close(p.read(applied), 7.5);
    });
  }
  it("finite sources cannot offer their number of sources or more", () => {
    expect(() => sweepParameters.offeredTraffic.apply(processes["finite-source"], 30)).toThrow(/not below the 30 sources/);
  });
});

describe("peakedness", () => {
  const p = sweepParameters.peakedness;
  it("Poisson becomes Poisson batches with geometric sizes of mean Z; the call rate is kept", () => {
    const s = parseScenario(p.apply(processes.poisson, 3));
    expect(s.arrivals).toEqual({ process: "batch", rate: 1, batchSize: { law: "geometric", mean: 3 }, admission: "partial" });
    // Geometric sizes on {1, 2, ...} with mean m: E[X^2] = m(2m - 1), so Z = (1 + E[X^2]/E[X]) / 2 = m
    // (Campbell's theorem for batch Poisson on an infinite group with exponential holding; computed here).
    const m = 3;
    expect((1 + (m * (2 * m - 1)) / m) / 2).toBe(3);
    close(p.read(s), 3);
    close(meanCallRate(s), 3);
    expect(p.apply(processes.poisson, 1)).toEqual(processes.poisson);
  });
  for (const name of ["on-off", "mmpp", "batch"]) {
    it(`${name}: reads back the peakedness applied and keeps the mean call rate`, () => {
      const s = processes[name];
      for (const z of [1.2, 2, 3.5]) {
        const applied = parseScenario(p.apply(s, z));
        close(p.read(applied), z, 1e-7);
        close(meanCallRate(applied), meanCallRate(s), 1e-12);
      }
    });
  }
  it("refuses clearly where it does not apply or cannot be reached", () => {
    expect(() => p.apply(processes.overflow, 2)).toThrow(/peakedness: does not apply to overflow arrivals: .*primary groups/);
    expect(() => p.read(processes.renewal)).toThrow(/sweep burstiness/);
    expect(() => p.apply(processes.poisson, 0.5)).toThrow(/must be >= 1/);
    expect(() => p.apply(processes.mmpp, 1e6)).toThrow(/out of reach for these phases \(at most/);
    const fixed = base({ process: "batch", rate: 1, batchSize: { law: "fixed", value: 3 } });
    expect(() => p.apply(fixed, 2)).toThrow(SweepParameterError);
  });
});

describe("burstiness, holding, persistence, servers", () => {
  it("burstiness is the interarrival SCV; Poisson becomes gamma renewal with the same mean", () => {
    const b = sweepParameters.burstiness;
    const s = parseScenario(b.apply(processes.poisson, 4));
    expect(s.arrivals).toEqual({ process: "renewal", interarrival: { law: "gamma", mean: 1 / 3, cv: 2 } });
    close(b.read(s), 4);
    close(b.read(parseScenario(b.apply(processes.renewal, 0.25))), 0.25);
    expect(() => b.apply(processes.mmpp, 2)).toThrow(/burstiness: does not apply to mmpp arrivals/);
    expect(() => b.apply(base({ process: "renewal", interarrival: { law: "hyperexponential", mean: 1, scv: 2 } }), 0.5)).toThrow(/>= 1 for hyperexponential/);
  });
  it("SCV of laws: erlang 1/k, uniform (b-a)^2/12/m^2, hyperexponential branches (textbook moments)", () => {
    expect(lawScv({ law: "erlang", k: 4, mean: 1 })).toBe(0.25);
    close(lawScv({ law: "uniform", min: 0, max: 2 }), 1 / 3);
    // p = (0.5, 0.5), means (1, 3): E[X] = 2, E[X^2] = 0.5*2*1 + 0.5*2*9 = 10, SCV = 10/4 - 1 = 1.5
    close(lawScv({ law: "hyperexponential", probabilities: [0.5, 0.5], means: [1, 3] }), 1.5);
  });
  it("mean holding scales the law and keeps its shape; the arrival rate is kept", () => {
    const s = base({ process: "poisson", rate: 3 }, { holding: { law: "lognormal", mean: 2, cv: 1.5 } });
    const applied = parseScenario(sweepParameters.meanHolding.apply(s, 5));
    expect(applied.holding).toEqual({ law: "lognormal", mean: 5, cv: 1.5 });
    close(trafficAtGroup(applied), 15);
  });
  it("retry persistence needs repeated attempts; servers and waiting positions are set as given", () => {
    expect(() => sweepParameters.retryPersistence.read(processes.poisson)).toThrow(/no repeated attempts/);
    const retrying = base({ process: "poisson", rate: 3 }, { retrials: { persistence: 0.5, delay: { law: "exponential", mean: 10 } } });
    expect(parseScenario(sweepParameters.retryPersistence.apply(retrying, 0.8)).retrials?.persistence).toBe(0.8);
    expect(sweepParameters.servers.apply(processes.poisson, 14).servers).toBe(14);
    expect(sweepParameters.waitingPositions.apply(processes.poisson, 3).waitingPositions).toBe(3);
  });
});
