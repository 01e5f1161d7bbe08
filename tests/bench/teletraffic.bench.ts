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

export async function runTeletrafficBench(): Promise<void> {
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
