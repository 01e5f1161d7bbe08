// Worker-thread entry: runs replications of the scenarios it is sent; see pool.ts.
import { parentPort } from "node:worker_threads";
import type { FromWorker } from "./pool";
import { ReplicationJob, SLICE_EVENTS } from "./replication";
import type { Scenario } from "./scenario";

const scenarios = new Map<string, Scenario>();
const post = (message: FromWorker) => parentPort!.postMessage(message);

parentPort!.on("message", (message: { type: "scenario"; key: string; scenario: Scenario } | { type: "run"; key: string; index: number }) => {
  if (message.type === "scenario") {
    scenarios.set(message.key, message.scenario);
    return;
  }
  try {
    const scenario = scenarios.get(message.key);
    if (!scenario) throw new Error(`replication thread has no scenario for ${message.key}`);
    const job = new ReplicationJob(scenario, message.index);
    while (!job.advance(SLICE_EVENTS)) post({ type: "progress", index: message.index, fraction: job.progress() });
    post({ type: "done", index: message.index, stats: job.stats() });
  } catch (error) {
    post({ type: "error", message: error instanceof Error ? error.message : String(error) });
  }
});
