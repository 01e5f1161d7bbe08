// Timing figures for lib/teletraffic (median of several repetitions, printed with the result values).
import {
  batchPoissonLossSystem,
  engsetIdleRateForOfferedTraffic,
  equivalentRandom,
  erlangB,
  extendedErlangB,
  kaufmanRoberts,
  maxTrafficForBlocking,
  minServersForBlocking,
  mmppLossSystem,
  overflowLossSystem,
  realServersForBlocking,
  renewalLossSystem,
  batchLossSystem,
  engsetServers,
  erlangCServers,
  mmppQueueSystem,
  patienceQueue,
  retrialLossSystem,
  retrialServers,
  streamPeakedness,
  timeVaryingLoss,
  periodicLossSystem,
  periodicLossWork,
  periodicRetrialSystem,
  periodicRetrialWork,
} from "../../lib/teletraffic";

function time<T>(label: string, run: () => T, describe: (result: T) => string, repetitions = 9): void {
  run(); // warm-up (JIT)
  const samples: number[] = [];
  let result!: T;
  for (let i = 0; i < repetitions; i++) {
    const start = performance.now();
    result = run();
    samples.push(performance.now() - start);
  }
  samples.sort((a, b) => a - b);
  const median = samples[Math.floor(samples.length / 2)];
  console.log(`  ${label.padEnd(52)} ${median.toFixed(3).padStart(10)} ms   ${describe(result)}`);
}

/** The reference of every ratio below: Erlang B at N = 100 000, measured in the same run. */
function referenceMs(): number {
  const samples: number[] = [];
  for (let i = 0; i < 9; i++) {
    const start = performance.now();
    erlangB(100_000, 95_000);
    samples.push(performance.now() - start);
  }
  return samples.sort((a, b) => a - b)[4];
}

/** Largest interactive case of each method added for exact references (issue 12), as ratios to referenceMs. */
function ratio<T>(label: string, unit: number, run: () => T, describe: (result: T) => string): void {
  run();
  const samples: number[] = [];
  let result!: T;
  for (let i = 0; i < 5; i++) {
    const start = performance.now();
    result = run();
    samples.push(performance.now() - start);
  }
  const median = samples.sort((a, b) => a - b)[2];
  console.log(`  ${label.padEnd(64)} ${median.toFixed(2).padStart(9)} ms = ${(median / unit).toFixed(1).padStart(7)} × ref   ${describe(result)}`);
}

export async function runTeletrafficBench(): Promise<void> {
  const unit = referenceMs();
  console.log(`exact references, largest interactive case (reference: Erlang B B(100 000, 95 000) = ${unit.toFixed(3)} ms; interactive means about 100 ms)`);
  ratio("retrial model N = 200, A = 190, p = 0.8", unit, () => retrialLossSystem({ servers: 200, traffic: 190, persistence: 0.8, meanRetryDelay: 1 }), (r) => `${r.states} states, loss ${r.lossProbability.toPrecision(6)}`);
  ratio("retrial model, persistence 1, N = 50, A = 45", unit, () => retrialLossSystem({ servers: 50, traffic: 45, persistence: 1, meanRetryDelay: 1 }), (r) => `${r.states} states, orbit cap ${r.orbitCap}`);
  ratio("retrial sizing A = 100, p = 0.8, loss 0.1 %", unit, () => retrialServers({ traffic: 100, persistence: 0.8, meanRetryDelay: 1, target: 0.001 }), (r) => `N = ${r.servers}`);
  ratio("patience queue N = 1 000, Q = 10 000", unit, () => patienceQueue({ servers: 1000, traffic: 990, waitingPositions: 10_000, meanPatience: 2 }), (r) => `abandon ${r.abandonmentProbability.toPrecision(6)}`);
  ratio("batch, uniform 1..100, N + Q = 2 000 (2·10^5 work)", unit, () => batchLossSystem({ servers: 1500, waitingPositions: 500, traffic: 1400, batchSize: { law: "uniform", min: 1, max: 100 }, admission: "all-or-nothing" }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("batch, empirical up to 10 000, N = 2 000 (2·10^7 work)", unit, () => batchLossSystem({ servers: 2000, traffic: 1900, batchSize: { law: "empirical", values: [1, 10_000], probabilities: [0.999, 0.001] }, admission: "partial" }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("MMPP 16 phases, N = 2 400 ((N + 1) k³ = 10^7)", unit, () => mmppLossSystem({ servers: 2400, rates: Array.from({ length: 16 }, (_, i) => 2200 + 25 * i), switching: Array.from({ length: 16 }, (_, i) => Array.from({ length: 16 }, (_, l) => (l === (i + 1) % 16 ? 1 : 0))) }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("MMPP 16 phases with Q = 100, N = 2 300", unit, () => mmppQueueSystem({ servers: 2300, waitingPositions: 100, meanPatience: 1, rates: Array.from({ length: 16 }, (_, i) => 2200 + 25 * i), switching: Array.from({ length: 16 }, (_, i) => Array.from({ length: 16 }, (_, l) => (l === (i + 1) % 16 ? 1 : 0))) }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("GI/M/N/N lognormal (numerical transform), N = 2 500", unit, () => renewalLossSystem({ servers: 2500, interarrival: { law: "lognormal", mean: 1 / 2450, cv: 1.5 } }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("GI/M/N/N empirical, 1 000 samples, N = 2 000", unit, () => renewalLossSystem({ servers: 2000, interarrival: { law: "empirical", samples: Array.from({ length: 1000 }, (_, i) => (2 * (i + 0.5)) / 1000 / 1900) } }), (r) => `call ${r.callCongestion.toPrecision(6)}`);
  ratio("peakedness of a Pareto renewal stream + ER and Hayward, N = 1 000", unit, () => streamPeakedness({ stream: { process: "renewal", interarrival: { law: "pareto", mean: 1 / 950, shape: 2.2 } }, servers: 1000 }), (r) => `Z ${r.peakedness.toPrecision(6)}`);
  ratio("time-varying, 100 segments, N = 2 000 (PSA + MOL)", unit, () => timeVaryingLoss({ servers: 2000, profile: Array.from({ length: 100 }, (_, i) => ({ duration: 1, rate: 1800 + 200 * Math.sin(i / 5) })) }), (r) => `MOL ${r.modifiedLoadCallCongestion.toPrecision(6)}`);
  const daily = Array.from({ length: 20 }, (_, i) => ({ duration: 10, rate: 100 * (0.8 + 0.3 * Math.sin(i / 4)) }));
  ratio(`time-varying exact periodic, 20 segments of 10 h, N = 100 (${periodicLossWork(100, daily, 1).toPrecision(2)} work)`, unit, () => periodicLossSystem({ servers: 100, profile: daily }), (r) => `call ${r.callCongestion.toPrecision(6)}, bound ${r.errorBound.toExponential(1)}`);
  const retrying = { servers: 10, profile: Array.from({ length: 12 }, (_, i) => ({ duration: 1, rate: 10 * (0.7 + 0.35 * Math.sin(i / 2)) })), persistence: 0.8, meanRetryDelay: 1 };
  ratio(`time-varying with retrials, 12 segments, N = 10 (${periodicRetrialWork(retrying).toPrecision(2)} work)`, unit, () => periodicRetrialSystem(retrying), (r) => `loss ${r.lossProbability.toPrecision(6)}, ${r.states} states, ${r.cycles} cycles, bound ${r.errorBound.toExponential(1)}`);
  ratio("Erlang C sizing A = 10^5, P(W > 0.1) <= 0.2", unit, () => erlangCServers({ traffic: 100_000, target: 0.2, measure: "wait-beyond-limit", waitLimit: 0.1 }), (r) => `N = ${r.servers}`);
  ratio("Engset sizing S = 10^6, call congestion 1 %", unit, () => engsetServers({ sources: 1_000_000, idleRate: 0.01, target: 0.01 }), (r) => `N = ${r.servers}`);
  ratio("Engset inverse S = 10^5, N = S − 1 (worst case)", unit, () => engsetIdleRateForOfferedTraffic({ sources: 100_000, servers: 99_999, attemptPerSource: 0.5 }), (r) => `${r.iterations} steps, bound ${r.errorBound.toExponential(1)}`);
  console.log("teletraffic (median of 9 runs after one warm-up)");
  time("Erlang B B(100 000, 95 000)", () => erlangB(100_000, 95_000), (b) => `B = ${b.toExponential(6)}`);
  time("Erlang B B(100 000.5, 100 000) (continuation)", () => erlangB(100_000.5, 100_000), (b) => `B = ${b.toPrecision(10)}`);
  time("smallest N for A = 50 000 at 1 %", () => minServersForBlocking({ traffic: 50_000, target: 0.01 }), (r) => `N = ${r.servers}, real N = ${r.realServers.toFixed(6)}, B = ${r.blocking.toPrecision(8)}`);
  time("real N for A = 50 000 at 1 %", () => realServersForBlocking({ traffic: 50_000, target: 0.01 }), (r) => `N* = ${r.realServers.toFixed(8)}`);
  time("largest A for N = 10 000 at 1 %", () => maxTrafficForBlocking({ servers: 10_000, target: 0.01 }), (r) => `A = ${r.traffic.toFixed(8)} (${r.iterations} Newton steps)`);
  time("largest A for N = 100 000 at 1 %", () => maxTrafficForBlocking({ servers: 100_000, target: 0.01 }), (r) => `A = ${r.traffic.toFixed(6)}`);
  time("equivalent random M = 30, V = 90 on 20 servers", () => equivalentRandom({ mean: 30, variance: 90, servers: 20 }), (r) => `A* = ${r.equivalentTraffic.toFixed(6)}, N* = ${r.equivalentServers.toFixed(6)}, B = ${r.blocking!.toPrecision(6)}`);
  time("equivalent random M = 300, V = 1500 on 250 servers", () => equivalentRandom({ mean: 300, variance: 1500, servers: 250 }), (r) => `A* = ${r.equivalentTraffic.toFixed(4)}, N* = ${r.equivalentServers.toFixed(4)}, B = ${r.blocking!.toPrecision(6)}`);
  time("extended Erlang B N = 100, A = 95, r = 0.8", () => extendedErlangB({ servers: 100, traffic: 95, persistence: 0.8 }), (r) => `B = ${r.blocking.toPrecision(6)}, ${r.iterations} iterations`);
  time("MMPP 2 phases, N = 2 000", () => mmppLossSystem({ servers: 2000, rates: [2400, 1600], switching: [[0, 1], [1, 0]] }), (r) => `time ${r.timeCongestion.toPrecision(6)}, call ${r.callCongestion.toPrecision(6)}`);
  time("MMPP 4 phases, N = 49 999 (200 000 states)", () => mmppLossSystem({ servers: 49_999, rates: [52_000, 48_000, 50_000, 46_000], switching: [[0, 1, 0, 0], [0, 0, 1, 0], [0, 0, 0, 1], [1, 0, 0, 0]] }), (r) => `time ${r.timeCongestion.toPrecision(6)}, call ${r.callCongestion.toPrecision(6)}`, 3);
  time("GI/M/N/N H2 (scv 9), N = 5 000", () => renewalLossSystem({ servers: 5000, interarrival: { law: "hyperexponential", mean: 1 / 4900, scv: 9 } }), (r) => `call ${r.callCongestion.toPrecision(6)}, time ${r.timeCongestion.toPrecision(6)}`);
  time("batch Poisson m = 3, N = 100 000, all-or-nothing", () => batchPoissonLossSystem({ servers: 100_000, traffic: 99_000, meanBatchSize: 3, admission: "all-or-nothing" }), (r) => `call ${r.callCongestion.toPrecision(6)}, time ${r.timeCongestion.toPrecision(6)}`);
  time("Kaufman–Roberts C = 100 000, 3 classes", () => kaufmanRoberts({ capacity: 100_000, classes: [{ traffic: 50_000, bandwidth: 1 }, { traffic: 4_000, bandwidth: 6 }, { traffic: 500, bandwidth: 30 }] }), (r) => r.classes.map((c) => c.blocking.toPrecision(4)).join(" / "));
  time("Engset inverse S = 1 000, N = 100, α = 0.09", () => engsetIdleRateForOfferedTraffic({ sources: 1000, servers: 100, attemptPerSource: 0.09 }), (r) => `γ = ${r.idleRate.toPrecision(8)}, ${r.iterations} iterations, call congestion ${r.callCongestion.toPrecision(4)}`);
  time("overflow network 2 primaries (15, 10) onto 20", () => overflowLossSystem({ primaries: [{ traffic: 12, servers: 15 }, { traffic: 8, servers: 10 }], servers: 20 }), (r) => `exact ${r.blocking.toPrecision(6)}, ER ${r.equivalentRandomBlocking.toPrecision(6)}, states ${r.states}`, 3);
  time("overflow network 2 primaries (20, 20) onto 10 (Gauss–Seidel)", () => overflowLossSystem({ primaries: [{ traffic: 15, servers: 20 }, { traffic: 15, servers: 20 }], servers: 10 }), (r) => `exact ${r.blocking.toPrecision(6)}, ER ${r.equivalentRandomBlocking.toPrecision(6)}, states ${r.states}`, 3);
}
