import { parseScenario, runScenario } from "./index";
(async () => {
  const s = parseScenario({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "lognormal", mean: 1, cv: 1 }, run: { seed: 1, replications: 8, callsPerReplication: 2_500_000 } });
  for (const threads of [2, 1, 2]) {
    const t0 = performance.now();
    const r = await runScenario(s, { threads });
    console.log(threads, ((performance.now() - t0) / 1000).toFixed(2), "s", r.callCongestion.estimate);
  }
})();
