// run-chunk-failed (pg-boss dead letter of run-chunk): a chunk used up its retries, so its run fails.
import type PgBoss from "pg-boss";
import type { Payload } from "../../lib/jobs/contracts";
import type { WorkerContext } from "../context";
import { failRun } from "../runs";

export async function runChunkFailed(ctx: WorkerContext, { runId, chunk }: Payload<"run-chunk-failed">, job: PgBoss.JobWithMetadata<unknown>): Promise<void> {
  const reason = outputMessage(job.output) ?? "its worker stopped (killed, or over the chunk's time limit)";
  // Timeouts are how pg-boss reports a chunk whose worker died on every attempt.
  const message = /timeout/i.test(reason) ? "its worker stopped on every attempt (killed, or over the chunk's time limit)" : reason;
  await failRun(ctx.db, ctx.boss, runId, `chunk ${chunk} failed after ${job.retryLimit + 1} attempts: ${message}`, { chunk });
}

function outputMessage(output: unknown): string | undefined {
  const o = output as { message?: unknown; value?: { message?: unknown } } | null;
  const message = o?.message ?? o?.value?.message;
  return typeof message === "string" && message ? message : undefined;
}
