// Variance per call of the call-congestion estimate, relative to independent sampling B(1 - B)/n
// (issue #11: 5.2x for the direct count on M/M/30/30 at 1 % blocking; target <= 2.5x). Figures
// only; the statistical checks live in tests/unit/simulation/variance-reduction*.test.ts.
import { aggregateReplications } from "../../lib/simulation/aggregate";
import { enginePathFor, type EnginePath } from "../../lib/simulation/dispatch";
import { ReplicationJob } from "../../lib/simulation/replication";
import { buildResult } from "../../lib/simulation/result";
import { parseScenario, type ScenarioInput } from "../../lib/simulation/node";
import { erlangB } from "../../lib/teletraffic";

const REPLICATIONS = 100;
const CALLS = 50_000;

function trafficForBlocking(servers: number, target: number): number {
  let lo = 0;
  let hi = 2 * servers;
  for (let i = 0; i < 100; i++) {
    const mid = (lo + hi) / 2;
    if (erlangB(servers, mid) < target) lo = mid;
    else hi = mid;
  }
  return lo;
}

const exp1 = { law: "exponential", mean: 1 } as const;
const run = { seed: 3, replications: REPLICATIONS, callsPerReplication: CALLS, warmupCalls: 2_000 };
const cases: Array<{ name: string; scenario: ScenarioInput }> = [
  { name: "M/M/30/30 at 1 % blocking", scenario: { servers: 30, arrivals: { process: "poisson", rate: trafficForBlocking(30, 0.01) }, holding: exp1, run } },
  { name: "bursty: on-off (28 calls/h on, 1 h on, 1 h off), 30 servers", scenario: { servers: 30, arrivals: { process: "on-off", onRate: 28, meanOn: 1, meanOff: 1 }, holding: exp1, run } },
  { name: "peaky: overflow of 20 E/20 and 10 E/8 onto 15", scenario: { servers: 15, arrivals: { process: "overflow", primaries: [{ traffic: 20, servers: 20 }, { traffic: 10, servers: 8 }] }, holding: exp1, run } },
  { name: "peaky: H2 renewal (scv 4), 30 servers, 17 E", scenario: { servers: 30, arrivals: { process: "renewal", interarrival: { law: "hyperexponential", mean: 1 / 17, scv: 4 } }, holding: exp1, run } },
];

/** Result of every replication of the scenario on one loop. */
function resultOn(s: ReturnType<typeof parseScenario>, path: EnginePath) {
  const stats = Array.from({ length: s.run.replications }, (_, i) => {
    const job = new ReplicationJob(s, i, path);
    while (!job.advance(Number.MAX_SAFE_INTEGER));
    return job.stats();
  });
  return buildResult(s, aggregateReplications(stats, s.servers), []);
}

export async function runVarianceBench(): Promise<void> {
  console.log(`\ncall-congestion variance per call / independent sampling (${REPLICATIONS} x ${CALLS} calls): the direct count on the reference loop, and what a run reports on the loop the dispatcher picks`);
  for (const c of cases) {
    const s = parseScenario(c.scenario);
    const t0 = performance.now();
    const reference = resultOn(s, "reference");
    const path = enginePathFor(s);
    const r = path === "reference" ? reference : resultOn(s, path);
    const b = reference.callCongestionDirect.estimate;
    const ratio = (se: number, calls: number) => (se * se * calls) / (b * (1 - b));
    const direct = ratio(reference.callCongestionDirect.standardError, reference.calls);
    const reduced = ratio(reference.callCongestion.standardError, reference.calls);
    const best = ratio(r.callCongestion.standardError, r.calls);
    console.log(`  ${c.name.padEnd(58)} B ${b.toFixed(4)}  direct ${direct.toFixed(2)}x  reduced on the reference loop ${reduced.toFixed(2)}x  reported ${best.toFixed(2)}x on the ${path} loop  (factor ${(direct / best).toFixed(2)}, ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
    console.log(`    ${r.callCongestion.method}`);
  }
}
