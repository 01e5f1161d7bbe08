import { parseScenario, runScenario } from "/work/main/lib/simulation";
const s = parseScenario({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "exponential", mean: 1 },
  run: { seed: 7, replications: 10, callsPerReplication: 1000000, warmupCalls: 1000 } });
(async () => {
const t0 = performance.now();
const r = await runScenario(s, { threads: Number(process.argv[2] ?? 1) });
const ms = performance.now() - t0;
console.log(JSON.stringify({ ...r, occupancy: r.occupancy.length }, null, 1).slice(0, 1500));
console.log((r.events / ms / 1e3).toFixed(2), "M events/s", ms.toFixed(0), "ms");
})();
