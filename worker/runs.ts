// The queue orchestrator of one run: what to queue next, and the one place a run is finalised.
import type PgBoss from "pg-boss";
import { queues } from "../lib/jobs/contracts";
import { chunkRange, decideNext, finishRun, parseScenario, type PartialAggregate, type Reference, type RunPlan, type Scenario } from "../lib/simulation/node";
import {
  chunkAggregates,
  insertChunks,
  listChunks,
  markRunFailed,
  markRunSucceeded,
  storePartialResult,
  updateRunCounters,
  withRunLocked,
  type JobSend,
  type Transaction,
  type WorkRun,
} from "../db/queries/run-work";
import type { Database } from "../db/client";
import { chunkTimeLimitSeconds } from "./chunk-time";
import type { WorkerContext } from "./context";

export function runPlanOf(run: WorkRun): RunPlan {
  return run.plan as unknown as RunPlan;
}

async function aggregatesOf(tx: Transaction, runId: string, chunks?: number[]): Promise<Map<number, PartialAggregate>> {
  return (await chunkAggregates(tx, runId, chunks)) as unknown as Map<number, PartialAggregate>;
}

/**
 * With the run locked: re-evaluates the plan on the finished chunks, queues the chunks it asks for
 * that have no row yet (rows and jobs commit together), or finalises the run. Called when the run
 * starts and after every chunk lands, so the last chunk to land finalises, exactly once.
 */
export async function advanceRun(ctx: WorkerContext, tx: Transaction, run: WorkRun, scenario: Scenario, send: JobSend): Promise<"continue" | "complete"> {
  const plan = runPlanOf(run);
  const rows = await listChunks(tx, run.id);
  const done = new Set(rows.filter((r) => r.done).map((r) => r.chunk));
  // The precision stop folds the finished prefix; a fixed plan only needs to know which chunks are done.
  const aggregates = plan.precision ? await aggregatesOf(tx, run.id) : undefined;
  const finished = (chunk: number) => (aggregates ? aggregates.get(chunk) : done.has(chunk) ? ({} as PartialAggregate) : undefined);
  const decision = decideNext(scenario, plan, finished, ctx.lookahead);
  if (decision.kind === "complete") {
    const wanted = Array.from({ length: decision.chunks }, (_, c) => c);
    const loaded = aggregates ?? (await aggregatesOf(tx, run.id, wanted));
    const result = finishRun(scenario, wanted.map((c) => loaded.get(c)!), (run.references ?? []) as Reference[], decision);
    await markRunSucceeded(tx, run, result as unknown as Record<string, unknown> & { replications: number });
    await sendFinished(send, run, "succeeded");
    return "complete";
  }
  const existing = new Set(rows.map((r) => r.chunk));
  const fresh = decision.chunks.filter((c) => !existing.has(c)).map((chunk) => ({ chunk, ...chunkRange(plan, chunk) }));
  const inserted = await insertChunks(tx, run.id, fresh);
  for (const chunk of inserted) {
    // Jobs sent in one transaction share created_on, and pg-boss then picks them in id (random)
    // order; priority -chunk makes a run's chunks go in order, so its finished prefix grows steadily.
    await send(queues.runChunk, { runId: run.id, chunk }, { singletonKey: `${run.id}:${chunk}`, priority: -chunk, expireInSeconds: chunkTimeLimitSeconds(scenario, plan, chunk) });
  }
  let replicationsDone = 0;
  let queued = 0;
  for (const r of rows) {
    if (r.done) replicationsDone += r.replications;
    queued += r.replications;
  }
  for (const c of fresh) queued += c.replications;
  await updateRunCounters(tx, run.id, { replicationsDone, replicationsPlanned: Math.max(plan.initialReplications, queued) });
  if (inserted.length) ctx.wakeChunkWorkers();
  return "continue";
}

/**
 * A run that ended tells its sweep (which notifies once for all its points) or its submitter. A cancelled
 * run is told after its partial result is stored; the notice goes out only when someone else cancelled it.
 */
export async function sendFinished(send: JobSend, run: WorkRun, event: "succeeded" | "failed" | "cancelled"): Promise<void> {
  if (run.sweepId) await send(queues.sweepAdvance, { sweepId: run.sweepId, runId: run.id });
  else await send(queues.notify, { subject: "run", id: run.id, event });
}

/** Fails the run (if still queued or running) with the reason, and tells whoever should know. */
export async function failRun(db: Database, boss: PgBoss, runId: string, message: string, detail: Record<string, unknown> = {}): Promise<boolean> {
  return withRunLocked(db, boss, runId, async (tx, run, send) => {
    if (!run || !(await markRunFailed(tx, run, message, detail))) return false;
    await sendFinished(send, run, "failed");
    return true;
  });
}

/**
 * The partial result of a cancelled run: the fold of its finished chunks from the first one on
 * (the fold needs consecutive chunks), with stopReason "cancelled". Stored once.
 */
export async function finaliseCancelled(ctx: WorkerContext, runId: string): Promise<void> {
  await withRunLocked(ctx.db, ctx.boss, runId, async (tx, run, send) => {
    if (!run || run.status !== "cancelled" || run.result) return;
    const aggregates = await aggregatesOf(tx, run.id);
    const parts: PartialAggregate[] = [];
    for (let c = 0; aggregates.has(c); c++) parts.push(aggregates.get(c)!);
    let result = null;
    if (parts.length) {
      const scenario = parseScenario(run.scenario);
      result = finishRun(scenario, parts, (run.references ?? []) as Reference[]);
      result.stopReason = "cancelled";
    }
    await storePartialResult(tx, run, result as unknown as (Record<string, unknown> & { replications: number }) | null);
    await sendFinished(send, run, "cancelled");
  });
}
