// Queue contracts shared by the web app (senders), the worker (handlers) and health: queue names
// and the zod schema of each payload. Pure: no pg-boss, database or framework imports, so
// `app/` can import it without importing `worker/`.
import { z } from "zod";

export const queues = {
  /** Prepare a run: compute its references once, plan its chunks, queue them. */
  runStart: "run-start",
  /** One chunk of replications of a run (idempotent on (run, chunk)). */
  runChunk: "run-chunk",
  /** A chunk that used up its retries (pg-boss dead letter of run-chunk): fail its run with the reason. */
  runChunkFailed: "run-chunk-failed",
  /** Fold what is there into the stored result: after the last chunk, or a partial one after a cancel. */
  runFinalise: "run-finalise",
  /** Prepare a sweep, grid or dimensioning search: create its point runs (or the first probes). */
  sweepStart: "sweep-start",
  /** A point run of a sweep finished: update the sweep, plan the next probe, or finish the sweep. */
  sweepAdvance: "sweep-advance",
  /** E-mail the submitter about a finished or failed run or sweep, or a review decision. */
  notify: "notify",
  /** Read a stored measured-traffic upload and characterise it (busy hour, peakedness, holding-time fits). */
  characteriseUpload: "characterise-upload",
} as const;
export type QueueName = (typeof queues)[keyof typeof queues];
export const allQueueNames: QueueName[] = Object.values(queues);

const id = z.string().min(1).max(100);

export const payloadSchemas = {
  [queues.runStart]: z.strictObject({ runId: id }),
  [queues.runChunk]: z.strictObject({ runId: id, chunk: z.number().int().min(0) }),
  [queues.runChunkFailed]: z.strictObject({ runId: id, chunk: z.number().int().min(0) }),
  [queues.runFinalise]: z.strictObject({ runId: id }),
  [queues.sweepStart]: z.strictObject({ sweepId: id }),
  [queues.sweepAdvance]: z.strictObject({ sweepId: id, runId: id }),
  [queues.notify]: z.strictObject({
    subject: z.enum(["run", "sweep"]),
    id,
    event: z.enum(["succeeded", "failed", "cancelled", "approved", "changes-requested"]),
  }),
  [queues.characteriseUpload]: z.strictObject({ uploadId: id }),
} satisfies Record<QueueName, z.ZodType>;

export type Payload<Q extends QueueName> = z.infer<(typeof payloadSchemas)[Q]>;

export function parsePayload<Q extends QueueName>(queue: Q, data: unknown): Payload<Q> {
  return payloadSchemas[queue].parse(data) as Payload<Q>;
}
