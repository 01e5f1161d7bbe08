import { describe, expect, it } from "vitest";
import * as T from "../../../lib/teletraffic";
import { analyticOperations } from "../../../lib/teletraffic";

/** Runs f and returns the TeletrafficInputError it throws (failing the test otherwise). */
function inputErrorOf(f: () => unknown): T.TeletrafficInputError {
  try {
    f();
  } catch (error) {
    if (error instanceof T.TeletrafficInputError) return error;
    throw new Error(`expected a TeletrafficInputError, got ${String(error)}`);
  }
  throw new Error("expected a TeletrafficInputError, nothing was thrown");
}

// Domain rules as documented in the schemas (.describe); each case names the field it must report.
const cases: Array<[label: string, field: string, run: () => unknown]> = [
  ["erlangB negative servers", "servers", () => T.erlangB(-1, 5)],
  ["erlangB negative traffic", "traffic", () => T.erlangB(5, -1)],
  ["erlangB NaN traffic", "traffic", () => T.erlangB(5, Number.NaN)],
  ["erlangB infinite servers", "servers", () => T.erlangB(Number.POSITIVE_INFINITY, 1)],
  ["erlangB servers over the bound", "servers", () => T.erlangB(2e7, 1)],
  ["logErlangB infinite traffic", "traffic", () => T.logErlangB(5, Number.POSITIVE_INFINITY)],
  ["state distribution with non-integer servers", "servers", () => T.erlangBStateDistribution(2.5, 1)],
  ["state distribution over the bound", "servers", () => T.erlangBStateDistribution(2_000_000, 1)],
  ["summary with a string", "traffic", () => T.erlangBSummary({ servers: 1, traffic: "x" as unknown as number })],
  ["largest A, target 0", "target", () => T.maxTrafficForBlocking({ servers: 10, target: 0 })],
  ["largest A, target 1", "target", () => T.maxTrafficForBlocking({ servers: 10, target: 1 })],
  ["largest A, zero servers", "servers", () => T.maxTrafficForBlocking({ servers: 0, target: 0.01 })],
  ["smallest N, zero traffic", "traffic", () => T.minServersForBlocking({ traffic: 0, target: 0.01 })],
  ["smallest N, target 1.5", "target", () => T.minServersForBlocking({ traffic: 5, target: 1.5 })],
  ["real N, negative traffic", "traffic", () => T.realServersForBlocking({ traffic: -1, target: 0.01 })],
  ["Erlang C at A = N", "traffic", () => T.erlangC({ servers: 10, traffic: 10 })],
  ["Erlang C with fractional servers", "servers", () => T.erlangC({ servers: 2.5, traffic: 1 })],
  ["Erlang C with zero holding time", "meanHolding", () => T.erlangC({ servers: 5, traffic: 1, meanHolding: 0 })],
  ["finite queue with negative positions", "waitingPositions", () => T.finiteQueue({ servers: 5, traffic: 1, waitingPositions: -1 })],
  ["Engset without sources", "sources", () => T.engset({ sources: 0, servers: 1, idleRate: 1 })],
  ["Engset negative idle rate", "idleRate", () => T.engset({ sources: 5, servers: 1, idleRate: -1 })],
  ["Engset inverse at α = 1", "attemptPerSource", () => T.engsetIdleRateForOfferedTraffic({ sources: 5, servers: 2, attemptPerSource: 1 })],
  ["overflow moments, negative traffic", "traffic", () => T.overflowMoments({ traffic: -1, servers: 3 })],
  ["equivalent random, zero mean", "mean", () => T.equivalentRandom({ mean: 0, variance: 1 })],
  ["equivalent random, smooth traffic", "variance", () => T.equivalentRandom({ mean: 5, variance: 4 })],
  ["Hayward without servers", "servers", () => T.haywardBlocking({ mean: 5, variance: 6 } as unknown as T.HaywardInput)],
  ["extended Erlang B, recall factor 1", "persistence", () => T.extendedErlangB({ servers: 5, traffic: 3, persistence: 1 })],
  ["renewal, Erlang with k = 0.5", "interarrival.k", () => T.renewalLossSystem({ servers: 3, interarrival: { law: "erlang", k: 0.5, mean: 1 } })],
  ["renewal, unknown law", "interarrival.law", () => T.renewalLossSystem({ servers: 3, interarrival: { law: "cauchy" } as unknown as T.InterarrivalLaw })],
  ["renewal, H2 with scv < 1", "interarrival.scv", () => T.renewalLossSystem({ servers: 3, interarrival: { law: "hyperexponential", mean: 1, scv: 0.5 } })],
  ["renewal, H2 probabilities not summing to 1", "interarrival.probabilities", () => T.renewalLossSystem({ servers: 3, interarrival: { law: "hyperexponential", probabilities: [0.5, 0.6], means: [1, 2] } })],
  ["renewal, fractional servers", "servers", () => T.renewalLossSystem({ servers: 2.5, interarrival: { law: "exponential", mean: 1 } })],
  ["renewal, stream far beyond the traffic bound", "interarrival", () => T.renewalLossSystem({ servers: 3, interarrival: { law: "gamma", mean: 1e-9, cv: 0.5 } })],
  ["equivalent random, equivalent traffic beyond the bound", "variance", () => T.equivalentRandom({ mean: 1e-3, variance: 1e6 })],
  ["MMPP without phases", "rates", () => T.mmppLossSystem({ servers: 3, rates: [], switching: [] })],
  ["MMPP with 17 phases", "rates", () => T.mmppLossSystem({ servers: 3, rates: new Array(17).fill(1), switching: [] })],
  ["retrial model with neither traffic nor sources", "traffic", () => T.retrialLossSystem({ servers: 3, persistence: 0.5, meanRetryDelay: 1 })],
  ["retrial model, persistence 1 at traffic >= servers", "traffic", () => T.retrialLossSystem({ servers: 3, traffic: 3, persistence: 1, meanRetryDelay: 1 })],
  ["retrial model over the state limit", "servers", () => T.retrialLossSystem({ servers: 100_000, sources: 1_000_000, idleRate: 1, persistence: 0.5, meanRetryDelay: 1 })],
  ["patience without waiting positions", "waitingPositions", () => T.patienceQueue({ servers: 3, traffic: 2, waitingPositions: 0, meanPatience: 1 })],
  ["batch law and mean size both given", "batchSize", () => T.batchLossSystem({ servers: 3, traffic: 1, meanBatchSize: 2, batchSize: { law: "fixed", value: 2 }, admission: "partial" })],
  ["all-or-nothing batches that never fit", "batchSize", () => T.batchLossSystem({ servers: 3, traffic: 1, batchSize: { law: "fixed", value: 4 }, admission: "all-or-nothing" })],
  ["Erlang C sizing without a wait limit", "waitLimit", () => T.erlangCServers({ traffic: 5, target: 0.1, measure: "wait-beyond-limit" })],
  ["Engset sizing at target 1", "target", () => T.engsetServers({ sources: 10, idleRate: 0.1, target: 1 })],
  ["time-varying profile with no traffic", "profile", () => T.timeVaryingLoss({ servers: 3, profile: [{ duration: 1, rate: 0 }] })],
  ["peakedness of a non-square MMPP", "stream.switching", () => T.streamPeakedness({ stream: { process: "mmpp", rates: [1, 2], switching: [[0, 1]] } })],
  ["MMPP with a non-square matrix", "switching", () => T.mmppLossSystem({ servers: 3, rates: [1, 2], switching: [[0, 1, 2], [1, 0, 3]] })],
  ["batch with unknown admission rule", "admission", () => T.batchPoissonLossSystem({ servers: 3, traffic: 1, meanBatchSize: 2, admission: "some" as "partial" })],
  ["batch with mean size below 1", "meanBatchSize", () => T.batchPoissonLossSystem({ servers: 3, traffic: 1, meanBatchSize: 0.5, admission: "partial" })],
  ["overflow network without primaries", "primaries", () => T.overflowLossSystem({ primaries: [], servers: 3 })],
  ["overflow network over the state limit", "servers", () => T.overflowLossSystem({ primaries: [{ traffic: 1, servers: 1000 }], servers: 1000 })],
  ["Kaufman–Roberts bandwidth above capacity", "classes.0.bandwidth", () => T.kaufmanRoberts({ capacity: 5, classes: [{ traffic: 1, bandwidth: 6 }] })],
  ["Kaufman–Roberts fractional bandwidth", "classes.0.bandwidth", () => T.kaufmanRoberts({ capacity: 5, classes: [{ traffic: 1, bandwidth: 1.5 }] })],
];

describe("out-of-domain input is rejected with a TeletrafficInputError naming the field (domains as documented in the zod schemas)", () => {
  it.each(cases)("%s → %s", (_label, field, run) => {
    const error = inputErrorOf(run);
    expect(error.kind).toBe("input");
    expect(error.field).toBe(field);
    expect(error.message.startsWith(`${field}:`)).toBe(true);
  });
});

describe("operation registry", () => {
  it("has every operation named in the API, each with a summary and schema", () => {
    expect(Object.keys(analyticOperations).sort()).toEqual(
      [
        "erlang-b",
        "erlang-c",
        "finite-queue",
        "engset",
        "engset-idle-rate",
        "engset-queue",
        "engset-servers",
        "erlang-c-servers",
        "mmpp-queue",
        "patience-queue",
        "peakedness",
        "retrial-loss",
        "retrial-servers",
        "time-varying-loss",
        "periodic-loss",
        "periodic-queue",
        "periodic-retrial",
        "mmpp-retrial",
        "renewal-queue",
        "renewal-retrial",
        "batch-retrial",
        "overflow-moments",
        "overflow-retrial",
        "equivalent-random",
        "hayward",
        "extended-erlang-b",
        "renewal-loss",
        "mmpp-loss",
        "batch-loss",
        "overflow-loss",
        "multi-rate",
      ].sort(),
    );
  });
  it.each(Object.keys(analyticOperations))("%s rejects an empty input with an input error", (name) => {
    const op = analyticOperations[name as keyof typeof analyticOperations];
    expect(typeof op.summary).toBe("string");
    inputErrorOf(() => op.evaluate({}));
  });
  it("erlang-b dispatches on the fields present (Erlang B definitions)", () => {
    const op = analyticOperations["erlang-b"];
    expect(op.evaluate({ servers: 30, traffic: 20 }).blocking).toBe(T.erlangB(30, 20));
    expect(op.evaluate({ servers: 24, target: 0.02 }).traffic).toBe(T.maxTrafficForBlocking({ servers: 24, target: 0.02 }).traffic);
    const sized = op.evaluate({ traffic: 20, target: 0.01 });
    expect(sized.servers).toBe(30);
    expect(sized.realServers).toBeLessThan(30);
    expect(typeof sized.method).toBe("string");
    expect(inputErrorOf(() => op.evaluate({ servers: 1, traffic: 2, target: 0.1 })).field).toBe("target");
    expect(inputErrorOf(() => op.evaluate({ servers: 1, trafic: 2 })).kind).toBe("input");
  });
  it("every operation evaluates a valid input to a result with a method label", () => {
    const inputs: Record<string, unknown> = {
      "erlang-b": { servers: 29.5, traffic: 20 },
      "erlang-c": { servers: 10, traffic: 8, waitLimit: 0.5 },
      "finite-queue": { servers: 10, traffic: 8, waitingPositions: 5 },
      engset: { sources: 20, servers: 5, idleRate: 0.2 },
      "engset-idle-rate": { sources: 20, servers: 5, attemptPerSource: 0.2 },
      "overflow-moments": { traffic: 10, servers: 8 },
      "equivalent-random": { mean: 3, variance: 6, servers: 4 },
      hayward: { mean: 3, variance: 2, servers: 4 },
      "extended-erlang-b": { servers: 10, traffic: 8, persistence: 0.5 },
      "renewal-loss": { servers: 10, interarrival: { law: "gamma", mean: 0.125, cv: 2 } },
      "mmpp-loss": { servers: 10, rates: [16, 0], switching: [[0, 1], [1, 0]] },
      "batch-loss": { servers: 10, traffic: 8, meanBatchSize: 2, admission: "partial" },
      "retrial-loss": { servers: 10, traffic: 8, persistence: 0.7, meanRetryDelay: 0.5 },
      "retrial-servers": { traffic: 8, persistence: 0.7, meanRetryDelay: 0.5, target: 0.01 },
      "mmpp-queue": { servers: 5, waitingPositions: 3, rates: [8, 0], switching: [[0, 1], [1, 0]], meanPatience: 2 },
      "patience-queue": { servers: 10, traffic: 8, waitingPositions: 5, meanPatience: 2 },
      "engset-queue": { sources: 20, idleRate: 0.2, servers: 5, waitingPositions: 3 },
      "erlang-c-servers": { traffic: 8, target: 0.2 },
      "engset-servers": { sources: 20, idleRate: 0.2, target: 0.01 },
      peakedness: { stream: { process: "renewal", interarrival: { law: "lognormal", mean: 0.1, cv: 2 } }, servers: 12 },
      "time-varying-loss": { servers: 10, profile: [{ duration: 2, rate: 4 }, { duration: 1, rate: 12 }] },
      "periodic-loss": { servers: 10, profile: [{ duration: 2, rate: 4 }, { duration: 1, rate: 12 }] },
      "renewal-queue": { servers: 5, waitingPositions: 3, interarrival: { law: "gamma", mean: 0.25, cv: 1.5 }, meanPatience: 2 },
      "renewal-retrial": { servers: 2, interarrival: { law: "uniform", min: 0.2, max: 0.8 }, persistence: 0.5, meanRetryDelay: 1 },
      "mmpp-retrial": { servers: 4, rates: [6, 1], switching: [[0, 1], [1, 0]], persistence: 0.6, meanRetryDelay: 0.5 },
      "batch-retrial": { servers: 4, traffic: 3, batchSize: { law: "uniform", min: 1, max: 3 }, admission: "partial", persistence: 0.6, meanRetryDelay: 0.5 },
      "periodic-queue": { servers: 10, waitingPositions: 3, profile: [{ duration: 2, rate: 4 }, { duration: 1, rate: 12 }], meanPatience: 2 },
      "periodic-retrial": { servers: 4, profile: [{ duration: 2, rate: 2 }, { duration: 1, rate: 7 }], persistence: 0.6, meanRetryDelay: 0.5 },
      "overflow-loss": { primaries: [{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }], servers: 4 },
      "overflow-retrial": { primaries: [{ traffic: 5, servers: 4 }, { traffic: 1, servers: 0 }], servers: 4, persistence: 0.6, meanRetryDelay: 0.5 },
      "multi-rate": { capacity: 20, classes: [{ traffic: 5, bandwidth: 1 }, { traffic: 1, bandwidth: 4 }] },
    };
    for (const [name, op] of Object.entries(analyticOperations)) {
      const result = op.evaluate(inputs[name]);
      expect(typeof result.method, name).toBe("string");
      expect(JSON.parse(JSON.stringify(result)), name).toEqual(result);
    }
    // A malformed field is an input error naming a field, never an internal failure: the refinements
    // that size the work run even when a field failed (a negative N crashed the periodic ones before).
    const malformed = [{ servers: -1 }, { servers: 2.5 }, { servers: "x" }, { waitingPositions: -3 }, { profile: "x" }, { profile: [{ duration: -1, rate: "a" }] }, { primaries: "x" }, { rates: "x" }, { batchSize: 2 }, { interarrival: "x" }];
    for (const [name, op] of Object.entries(analyticOperations))
      for (const bad of malformed) {
        try {
          op.evaluate({ ...(inputs[name] as object), ...bad });
        } catch (error) {
          expect((error as Error).name, `${name} ${JSON.stringify(bad)}: ${(error as Error).message}`).toMatch(/^Teletraffic(Input|Convergence)Error$/);
        }
      }
  });
});
