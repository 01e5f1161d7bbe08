// Queue name -> handler, registered by worker/main.ts. Payloads are parsed with lib/jobs/contracts.ts.
import type PgBoss from "pg-boss";
import { queues, type Payload, type QueueName } from "../../lib/jobs/contracts";
import type { WorkerContext } from "../context";
import { characteriseUpload } from "./characterise-upload";
import { notify } from "./notify";
import { runChunk } from "./run-chunk";
import { runChunkFailed } from "./run-chunk-failed";
import { runFinalise } from "./run-finalise";
import { runStart } from "./run-start";
import { sweepAdvance } from "./sweep-advance";
import { sweepStart } from "./sweep-start";

export type Handler<Q extends QueueName> = (ctx: WorkerContext, payload: Payload<Q>, job: PgBoss.JobWithMetadata<unknown>) => Promise<void>;

export interface HandlerEntry<Q extends QueueName> {
  handle: Handler<Q>;
  /**
   * Jobs of this queue one process works at once. "threads+1": one chunk per replication thread
   * plus one, so a chunk's database work (pickup, landing) overlaps another chunk's simulation
   * instead of leaving the threads idle.
   */
  concurrency: number | "threads+1";
  /** How often an idle poller looks for jobs (pg-boss's minimum is 0.5 s). */
  pollingIntervalSeconds: number;
}

export const handlers: { [Q in QueueName]: HandlerEntry<Q> } = {
  [queues.runStart]: { handle: runStart, concurrency: 1, pollingIntervalSeconds: 0.5 },
  [queues.runChunk]: { handle: runChunk, concurrency: "threads+1", pollingIntervalSeconds: 0.5 },
  [queues.runChunkFailed]: { handle: runChunkFailed, concurrency: 1, pollingIntervalSeconds: 2 },
  [queues.runFinalise]: { handle: runFinalise, concurrency: 1, pollingIntervalSeconds: 1 },
  [queues.sweepStart]: { handle: sweepStart, concurrency: 1, pollingIntervalSeconds: 1 },
  [queues.sweepAdvance]: { handle: sweepAdvance, concurrency: 1, pollingIntervalSeconds: 1 },
  [queues.notify]: { handle: notify, concurrency: 1, pollingIntervalSeconds: 2 },
  [queues.characteriseUpload]: { handle: characteriseUpload, concurrency: 1, pollingIntervalSeconds: 1 },
};
