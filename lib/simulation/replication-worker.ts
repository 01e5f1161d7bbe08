// Worker-thread entry: runs replications of one scenario on request; see run.ts.
import { parentPort, workerData } from "node:worker_threads";
import { ReplicationJob, SLICE_EVENTS } from "./run";
import type { Scenario } from "./scenario";

const scenario = (workerData as { scenario: Scenario }).scenario;

parentPort!.on("message", (message: { type: "run"; index: number }) => {
  try {
    const job = new ReplicationJob(scenario, message.index);
    while (!job.advance(SLICE_EVENTS)) parentPort!.postMessage({ type: "progress", index: message.index, fraction: job.progress() });
    parentPort!.postMessage({ type: "done", index: message.index, stats: job.stats() });
  } catch (error) {
    parentPort!.postMessage({ type: "error", message: error instanceof Error ? error.message : String(error) });
  }
});
