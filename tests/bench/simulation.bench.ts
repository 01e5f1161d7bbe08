// Simulation engine throughput: events per second on one core (plus one 2-thread figure).
// Prints figures only; speed targets live here, never in timed tests.
import { parseScenario, Replication, runScenario, type ScenarioInput } from "../../lib/simulation/node";

interface Case {
  name: string;
  scenario: ScenarioInput;
  generalLoop?: boolean;
}

const exp1 = { law: "exponential", mean: 1 } as const;
const run = (calls: number) => ({ seed: 1, replications: 2, callsPerReplication: calls / 2 });

const cases: Case[] = [
  { name: "M/M/30/30, 20 E, 20 M calls (fast path)", scenario: { servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: exp1, run: run(20e6) } },
  { name: "M/M/30/30, 20 E, 20 M calls (general loop)", scenario: { servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: exp1, run: run(20e6) }, generalLoop: true },
  { name: "M/G/30/30 lognormal cv 1, 20 E, 20 M calls", scenario: { servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "lognormal", mean: 1, cv: 1 }, run: run(20e6) } },
  { name: "on-off arrivals, 30 servers, 10 M calls", scenario: { servers: 30, arrivals: { process: "on-off", onRate: 40, meanOn: 1, meanOff: 1 }, holding: exp1, run: run(10e6) } },
  {
    name: "retrials p=0.7, 30 servers, 24 E, 10 M calls",
    scenario: { servers: 30, arrivals: { process: "poisson", rate: 24 }, holding: exp1, retrials: { persistence: 0.7, delay: { law: "exponential", mean: 0.5 }, maxAttempts: 10 }, run: run(10e6) },
  },
  { name: "M/M/10000/10000, 9000 E, 10 M calls", scenario: { servers: 10_000, arrivals: { process: "poisson", rate: 9_000 }, holding: exp1, run: { ...run(10e6), warmupCalls: 100_000 } } },
];

function timeReplications(c: Case): { events: number; seconds: number } {
  const s = parseScenario(c.scenario);
  let events = 0;
  const t0 = performance.now();
  for (let i = 0; i < s.run.replications; i++) {
    const r = new Replication(s, i, { generalLoop: c.generalLoop });
    while (!r.advance(Number.MAX_SAFE_INTEGER));
    events += r.stats().events;
  }
  return { events, seconds: (performance.now() - t0) / 1000 };
}

export async function runSimulationBench(): Promise<void> {
  console.log("\nsimulation engine (one core, all statistics collected)");
  for (const c of cases) {
    const { events, seconds } = timeReplications(c);
    console.log(`  ${c.name.padEnd(48)} ${(events / seconds / 1e6).toFixed(2).padStart(6)} M events/s  (${(events / 1e6).toFixed(1)} M events, ${seconds.toFixed(2)} s)`);
  }
  const s = parseScenario({ servers: 30, arrivals: { process: "poisson", rate: 20 }, holding: { law: "lognormal", mean: 1, cv: 1 }, run: { seed: 1, replications: 8, callsPerReplication: 2_500_000 } });
  for (const threads of [1, 2]) {
    const t0 = performance.now();
    const r = await runScenario(s, { threads });
    const seconds = (performance.now() - t0) / 1000;
    console.log(`  runScenario M/G/30/30, 8 x 2.5 M calls, --threads ${threads}`.padEnd(50) + ` ${(r.events / seconds / 1e6).toFixed(2).padStart(6)} M events/s  (${seconds.toFixed(2)} s incl. worker start-up)`);
  }
}
