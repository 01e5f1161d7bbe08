// `npm run bench`: prints timing figures. Speed targets live here, never in timed tests.
import { runTeletrafficBench } from "./teletraffic.bench";
import { runSimulationBench } from "./simulation.bench";
import { runVarianceBench } from "./variance.bench";
import { runQueueBench } from "./queue.bench";

async function main() {
  console.log(`Spillway benchmarks: node ${process.version}, ${new Date().toISOString()}`);
  await runTeletrafficBench();
  await runSimulationBench();
  await runVarianceBench();
  await runQueueBench();
}

main().catch((error) => {
  console.error(error);
  process.exitCode = 1;
});
