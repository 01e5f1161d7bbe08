import { sql } from "drizzle-orm";
import { getDatabase } from "@/db/client";
import { getBoss, queueHealth } from "@/db/queue";
import { heartbeatFailure, workerLiveness } from "@/db/queries/workers";
import { noLiveWorkerMessage } from "@/lib/jobs/worker-heartbeat";

export const dynamic = "force-dynamic";

/**
 * Database reachability, the job queue's state and the live workers; 503 only when the database is down.
 * "degraded" (200) when the queue is not ready or no worker has reported within the liveness window, with a
 * `message` saying what that means.
 */
export async function GET() {
  const started = performance.now();
  const db = getDatabase();
  let database: { ok: boolean; latencyMs?: number; error?: string };
  try {
    await db.execute(sql`select 1`);
    database = { ok: true, latencyMs: Math.round((performance.now() - started) * 10) / 10 };
  } catch (error) {
    return Response.json({ status: "down", database: { ok: false, error: (error as Error).message }, queue: { ok: false } }, { status: 503 });
  }
  const messages: string[] = [];
  let queue: Record<string, unknown>;
  try {
    // Asked through pg-boss's API (getQueues, getQueueSize), never SQL on its tables.
    queue = { ...(await queueHealth(await getBoss())) };
  } catch (error) {
    queue = { ok: false, error: (error as Error).message };
  }
  if (!queue.ok) messages.push(`The job queue is not ready: ${queue.error ?? "unknown reason"}.`);
  let workers: Record<string, unknown>;
  try {
    const liveness = await workerLiveness(db);
    // Health answers without sign-in: it tells how many workers are live and how fresh, not where they run
    // (no host names or process ids; those stay in the database for operators).
    const list = liveness.workers.map(({ threads, startedAt, lastSeenAt, seenSecondsAgo }) => ({ threads, startedAt, lastSeenAt, seenSecondsAgo }));
    workers = { ok: liveness.live > 0, ...liveness, workers: list };
    if (!liveness.live) messages.push(noLiveWorkerMessage(liveness.windowSeconds));
  } catch (error) {
    workers = { ok: false, error: heartbeatFailure(error) };
    messages.push(`Worker heartbeats could not be read: ${heartbeatFailure(error)}.`);
  }
  return Response.json({ status: messages.length ? "degraded" : "ok", ...(messages.length ? { message: messages.join(" ") } : {}), database, queue, workers });
}
