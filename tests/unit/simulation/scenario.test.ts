import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { parseScenario, ScenarioError, scenarioSchema, simulationResultSchema } from "../../../lib/simulation";
import { scenarioJsonSchemaText } from "../../../lib/simulation/json-schema";
import { GET } from "../../../app/api/v1/schema/scenario/route";

const good = () => ({
  servers: 30,
  waitingPositions: 0,
  arrivals: { process: "poisson", rate: 20 } as Record<string, unknown>,
  holding: { law: "exponential", mean: 1 } as Record<string, unknown>,
  retrials: { persistence: 0.7, delay: { law: "exponential", mean: 0.5 }, maxAttempts: 10 } as Record<string, unknown>,
  run: { seed: 7, replications: 20, callsPerReplication: 200000, warmupCalls: 20000, confidence: 0.95 } as Record<string, unknown>,
});

type Scn = ReturnType<typeof good> & Record<string, unknown>;
// [change, the message must start with]
const invalid: Array<[string, (s: Scn) => void, string]> = [
  ["negative switching rate", (s) => (s.arrivals = { process: "mmpp", rates: [1, 2], switching: [[0, 1], [-1, 0]] }), "arrivals.switching[1][0]: must be >= 0"],
  ["switching not k x k", (s) => (s.arrivals = { process: "mmpp", rates: [1, 2], switching: [[0, 1]] }), "arrivals.switching: must be a 2x2 matrix"],
  ["switching row too short", (s) => (s.arrivals = { process: "mmpp", rates: [1, 2], switching: [[0, 1], [1]] }), "arrivals.switching[1]: must have 2 entries"],
  ["reducible switching", (s) => (s.arrivals = { process: "mmpp", rates: [1, 2], switching: [[0, 1], [0, 0]] }), "arrivals.switching: every phase must be reachable"],
  ["unknown process", (s) => (s.arrivals = { process: "fractal", rate: 1 }), "arrivals.process: must be one of"],
  ["unknown law", (s) => (s.holding = { law: "cauchy", mean: 1 }), "holding.law: must be one of"],
  ["pareto shape <= 1", (s) => (s.holding = { law: "pareto", mean: 1, shape: 1 }), "holding.shape: must be > 1"],
  ["hyperexponential scv < 1", (s) => (s.holding = { law: "hyperexponential", mean: 1, scv: 0.5 }), "holding.scv: must be >= 1"],
  ["hyperexponential both forms", (s) => (s.holding = { law: "hyperexponential", mean: 1, scv: 2, means: [1, 2], probabilities: [0.5, 0.5] }), "holding: give either {mean, scv} or {probabilities, means}"],
  ["probabilities not summing to 1", (s) => (s.holding = { law: "hyperexponential", probabilities: [0.5, 0.4], means: [1, 2] }), "holding.probabilities: must sum to 1"],
  ["cv = 0", (s) => (s.holding = { law: "lognormal", mean: 1, cv: 0 }), "holding.cv: must be > 0"],
  ["weibull half given", (s) => (s.holding = { law: "weibull", mean: 1 }), "holding.cv: required with mean"],
  ["uniform max <= min", (s) => (s.holding = { law: "uniform", min: 2, max: 1 }), "holding.max: must be > min"],
  ["empirical all zero", (s) => (s.holding = { law: "empirical", samples: [0, 0] }), "holding.samples: must contain a value > 0"],
  ["retry delay law", (s) => (s.retrials = { persistence: 0.5, delay: { law: "gamma", mean: 1, cv: -1 } }), "retrials.delay.cv: must be > 0"],
  ["persistence > 1", (s) => (s.retrials = { persistence: 1.5, delay: { law: "exponential", mean: 1 } }), "retrials.persistence: must be <= 1"],
  ["batch probabilities", (s) => (s.arrivals = { process: "batch", rate: 1, batchSize: { law: "empirical", values: [1, 2], probabilities: [0.2, 0.7] } }), "arrivals.batchSize.probabilities: must sum to 1"],
  ["batch admission", (s) => (s.arrivals = { process: "batch", rate: 1, batchSize: { law: "fixed", value: 2 }, admission: "some" }), "arrivals.admission: must be one of"],
  ["overflow without primaries", (s) => (s.arrivals = { process: "overflow", primaries: [] }), "arrivals.primaries: needs at least 1 primary group"],
  ["fractional primary servers", (s) => (s.arrivals = { process: "overflow", primaries: [{ traffic: 3, servers: 1.5 }] }), "arrivals.primaries[0].servers: must be an integer"],
  ["zero sources", (s) => (s.arrivals = { process: "finite-source", sources: 0, idleRate: 1 }), "arrivals.sources: must be >= 1"],
  ["profile with no traffic", (s) => (s.arrivals = { process: "time-varying", profile: [{ duration: 1, rate: 0 }] }), "arrivals.profile: at least one segment needs a rate > 0"],
  ["servers as string", (s) => (s.servers = "30" as unknown as number), "servers: expected number, got string"],
  ["servers missing", (s) => delete (s as Partial<Scn>).servers, "servers: required"],
  ["too many servers", (s) => (s.servers = 100_001), "servers: must be <= 100000"],
  ["typo field", (s) => (s.sever = 3), 'scenario: unknown field "sever"'],
  ["one replication", (s) => (s.run.replications = 1), "run.replications: must be >= 2"],
  ["neither calls nor horizon", (s) => delete s.run.callsPerReplication, "run.callsPerReplication: give exactly one of callsPerReplication or horizon"],
  ["two warm-ups", (s) => (s.run.warmupTime = 3), "run.warmupCalls: give at most one of warmupCalls, warmupTime, warmup"],
  ["warmup not auto", (s) => (s.run.warmup = "yes"), "run.warmup: must be one of"],
  ["confidence 1", (s) => (s.run.confidence = 1), "run.confidence: must be < 1"],
  ["precision target", (s) => (s.run.precision = { relativeHalfWidth: 0, maxCalls: 10 }), "run.precision.relativeHalfWidth: must be > 0"],
  ["call budget", (s) => ((s.run.callsPerReplication = 100_000_000), (s.run.replications = 30)), "run.callsPerReplication: replications x callsPerReplication must be <= 2000000000"],
  ["patience without waiting", (s) => (s.patience = { law: "exponential", mean: 1 }), "patience: needs waitingPositions > 0"],
];

describe("scenario validation (zod schema + cross-field rules)", () => {
  it("the example from the issue parses and gets defaults", () => {
    const s = parseScenario(good());
    expect(s.run.confidence).toBe(0.95);
    const bare = parseScenario({ ...good(), waitingPositions: undefined, run: { seed: 1, replications: 2, horizon: 10 } });
    expect(bare.waitingPositions).toBe(0);
    expect(bare.run.confidence).toBe(0.95);
  });

  for (const [name, change, message] of invalid) {
    it(`rejects ${name} with a message naming the field`, () => {
      const s = good() as Scn;
      change(s);
      let error: unknown;
      try {
        parseScenario(s);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(ScenarioError);
      const e = error as ScenarioError;
      expect(e.kind).toBe("input");
      expect(e.message).not.toContain("\n");
      expect(e.message.startsWith(message), `"${e.message}" starts with "${message}"`).toBe(true);
    });
  }
});

describe("worked examples", () => {
  for (const name of ["regional-trunk-overflow.json", "field-crew-radio.json"]) {
    it(`examples/${name} is a valid scenario`, () => {
      const text = readFileSync(path.join(__dirname, "../../../lib/simulation/examples", name), "utf8");
      expect(() => parseScenario(JSON.parse(text))).not.toThrow();
    });
  }
});

describe("JSON Schema of the scenario file", () => {
  const committed = readFileSync(path.join(__dirname, "../../../lib/simulation/scenario.schema.json"), "utf8");

  it("the committed scenario.schema.json equals the one generated from zod (run npm run schema:scenario)", () => {
    expect(committed).toBe(scenarioJsonSchemaText());
  });

  it("GET /api/v1/schema/scenario serves it", async () => {
    const response = await GET();
    expect(response.status).toBe(200);
    expect(await response.json()).toEqual(JSON.parse(committed));
  });

  it("names the process and law variants and the bounds", () => {
    const text = committed;
    for (const word of ["finite-source", "time-varying", "hyperexponential", "all-or-nothing", "relativeHalfWidth"]) expect(text).toContain(word);
    expect(JSON.parse(text).properties.servers.maximum).toBe(100_000);
  });

  it("the output schema accepts a built result shape and rejects a wrong one", () => {
    expect(scenarioSchema).toBeDefined();
    const interval = { estimate: 0.1, standardError: 0.01, halfWidth: 0.02, ciLow: 0.08, ciHigh: 0.12 };
    const result = {
      seed: 1, confidence: 0.95, replications: 2, calls: 10, events: 20, offeredTraffic: 1,
      callCongestion: interval, callCongestionDirect: interval, timeCongestion: interval, carriedTraffic: interval,
      occupancy: [0.5, 0.5], warmupCalls: { mean: 0, min: 0, max: 0 }, warmupTime: { mean: 0, min: 0, max: 0 },
      references: [{ method: "Erlang B", assumptions: "x", exact: true, callCongestion: 0.5 }],
      stopReason: "planned", perReplication: { callCongestion: [0.1, 0.1], timeCongestion: [0.1, 0.1], calls: [5, 5] }, warnings: [],
    };
    expect(simulationResultSchema.safeParse(result).success).toBe(true);
    expect(simulationResultSchema.safeParse({ ...result, callCongestion: 0.1 }).success).toBe(false);
  });
});
