import { sql } from "drizzle-orm";
import { getDatabase } from "@/db/client";
import { getBoss, queueHealth } from "@/db/queue";

export const dynamic = "force-dynamic";

/** Database reachability and the job queue's state; 503 when the database is down. */
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
  let queue: Record<string, unknown>;
  try {
    // Asked through pg-boss's API (getQueues, getQueueSize), never SQL on its tables.
    queue = { ...(await queueHealth(await getBoss())) };
  } catch (error) {
    queue = { ok: false, error: (error as Error).message };
  }
  return Response.json({ status: queue.ok ? "ok" : "degraded", database, queue });
}
