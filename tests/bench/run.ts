// `npm run bench`: prints timing figures. Speed targets live here, never in timed tests.
// `npm run bench -- [section ...] [--cases name,name]` runs only the named sections (all by default,
// in this order); `--cases` limits the simulation table to the named rows (names as in c-loop.c).
import { runTeletrafficBench } from "./teletraffic.bench";
import { runSimulationBench, runStartupBench, simulationCaseNames } from "./simulation.bench";
import { runVarianceBench } from "./variance.bench";
import { runQueueBench } from "./queue.bench";

const sections: Record<string, () => Promise<void>> = {
  teletraffic: runTeletrafficBench,
  simulation: () => runSimulationBench(cases),
  startup: runStartupBench,
  variance: runVarianceBench,
  queue: runQueueBench,
};

const usage = `usage: npm run bench -- [${Object.keys(sections).join("|")} ...] [--cases ${simulationCaseNames.join(",")}]`;
const args = process.argv.slice(2);
let cases: string[] | undefined;
const chosen: string[] = [];
for (let i = 0; i < args.length; i++) {
  const arg = args[i];
  if (arg === "--cases" || arg.startsWith("--cases=")) {
    const value = arg === "--cases" ? args[++i] : arg.slice("--cases=".length);
    cases = (value ?? "").split(",").filter(Boolean);
    const unknown = cases.filter((c) => !simulationCaseNames.includes(c));
    if (unknown.length || !cases.length) refuse(`unknown or missing case ${unknown.join(", ")}`);
  } else if (arg in sections) chosen.push(arg);
  else refuse(`unknown argument "${arg}"`);
}

function refuse(message: string): never {
  console.error(`bench: ${message}; ${usage}`);
  process.exit(2);
}

async function main() {
  console.log(`Spillway benchmarks: node ${process.version}, ${new Date().toISOString()}`);
  for (const [name, run] of Object.entries(sections)) if (!chosen.length || chosen.includes(name)) await run();
}

main().catch((error) => {
  console.error(error);
  process.exitCode = 1;
});
