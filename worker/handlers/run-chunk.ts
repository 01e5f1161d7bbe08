// run-chunk: one chunk of replications on this process's thread pool; the result lands once.
import type PgBoss from "pg-boss";
import type { Payload } from "../../lib/jobs/contracts";
import { parseScenario, runChunk as simulateChunk, ScenarioError, SimulationCancelledError, type PartialAggregate } from "../../lib/simulation/node";
import { findRunForWork, markChunkStarted, recordChunkRetry, storeChunkAggregate, withRunLocked, writeChunkProgress } from "../../db/queries/run-work";
import { ChunkStopped, type WorkerContext } from "../context";
import { advanceRun, failRun, runPlanOf } from "../runs";
import { injectedChunkFailure } from "../test-hooks";

/** Progress (and the cancel check that rides on it) is written about once a second. */
const PROGRESS_INTERVAL_MS = 1000;
/** The chunk is abandoned this long before pg-boss would expire it, so it is retried rather than run twice at once. */
const EXPIRY_MARGIN_MS = 2000;

export async function runChunk(ctx: WorkerContext, { runId, chunk }: Payload<"run-chunk">, job: PgBoss.JobWithMetadata<unknown>): Promise<void> {
  const run = await findRunForWork(ctx.db, runId);
  if (!run || run.status !== "running") return; // cancelled, failed or finished: the queued chunk is dropped
  const scenario = parseScenario(run.scenario); // validated when the run started
  const plan = runPlanOf(run);
  if (!(await markChunkStarted(ctx.db, runId, chunk, ctx.name))) {
    // Already stored by an earlier attempt that died before the run moved on: move it on now.
    await land(ctx, runId, chunk);
    return;
  }
  const controller = new AbortController();
  ctx.running.add(controller);
  let fraction = 0;
  let writing: Promise<void> = Promise.resolve();
  const report = () => {
    writing = writing.then(async () => {
      const status = await writeChunkProgress(ctx.db, runId, chunk, fraction).catch(() => "running");
      if (status !== "running" && !controller.signal.aborted) controller.abort(new ChunkStopped("run-ended", `run ${runId} is ${status ?? "gone"}`));
    });
  };
  const ticker = setInterval(report, PROGRESS_INTERVAL_MS);
  const deadline = setTimeout(
    () => controller.abort(new ChunkStopped("time-limit", `chunk ${chunk} ran past its time limit of ${job.expireInSeconds} s`)),
    Math.max(1000, job.expireInSeconds * 1000 - EXPIRY_MARGIN_MS),
  );
  let aggregate: PartialAggregate;
  try {
    const injected = injectedChunkFailure(chunk, job.retryCount + 1);
    if (injected) throw injected;
    // The first slice's progress is written at once (the run shows it is moving), then once a second.
    let first = true;
    const onProgress = (f: number) => {
      fraction = f;
      if (first) {
        first = false;
        report();
      }
    };
    aggregate = await simulateChunk(scenario, plan, chunk, { runner: ctx.runner, key: runId, signal: controller.signal, onProgress });
  } catch (error) {
    const stop = controller.signal.reason;
    if (stop instanceof ChunkStopped && stop.reason === "run-ended") return; // cancel: what was done is kept by run-finalise
    if (stop instanceof ChunkStopped) throw stop; // released at shutdown or out of time: pg-boss runs it again
    if (error instanceof ScenarioError) {
      await failRun(ctx.db, ctx.boss, runId, `invalid scenario: ${error.message}`, { chunk, field: error.path });
      return;
    }
    const message = error instanceof Error ? error.message : String(error);
    if (job.retryCount < job.retryLimit) {
      await recordChunkRetry(ctx.db, run, { chunk, attempt: job.retryCount + 1, retryLimit: job.retryLimit, error: message });
      ctx.log(`run ${runId} chunk ${chunk}: attempt ${job.retryCount + 1} failed (${message}); pg-boss retries it`);
    } else {
      await failRun(ctx.db, ctx.boss, runId, `chunk ${chunk} failed after ${job.retryCount + 1} attempts: ${message}`, { chunk });
    }
    throw error instanceof SimulationCancelledError ? new Error(message) : error;
  } finally {
    clearInterval(ticker);
    clearTimeout(deadline);
    ctx.running.delete(controller);
    await writing;
  }
  await land(ctx, runId, chunk, aggregate);
}

/** With the run locked: store the chunk's aggregate (once) and move the run on. */
async function land(ctx: WorkerContext, runId: string, chunk: number, aggregate?: PartialAggregate): Promise<void> {
  await withRunLocked(ctx.db, ctx.boss, runId, async (tx, run, send) => {
    if (!run || run.status !== "running") return;
    if (aggregate) await storeChunkAggregate(tx, runId, chunk, aggregate as unknown as Record<string, unknown>);
    await advanceRun(ctx, tx, run, parseScenario(run.scenario), send);
  });
}
