import { sql } from "drizzle-orm";
import { getDatabase } from "@/db/client";
import { allQueueNames } from "@/lib/jobs/contracts";

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
    const installed = await db.execute<{ exists: boolean }>(sql`select to_regclass('pgboss.version') is not null as exists`);
    if (!installed.rows[0]?.exists) {
      queue = { ok: false, error: "the worker has not installed the pg-boss schema yet" };
    } else {
      const version = await db.execute<{ version: number }>(sql`select version from pgboss.version limit 1`);
      const queues = await db.execute<{ name: string }>(sql`select name from pgboss.queue`);
      const jobs = await db.execute<{ state: string; count: number }>(sql`select state::text, count(*)::int as count from pgboss.job group by state`);
      const present = new Set(queues.rows.map((r) => r.name));
      const missing = allQueueNames.filter((name) => !present.has(name));
      queue = {
        ok: missing.length === 0,
        schemaVersion: version.rows[0]?.version ?? null,
        queues: allQueueNames.map((name) => ({ name, created: present.has(name) })),
        jobs: Object.fromEntries(jobs.rows.map((r) => [r.state, r.count])),
        ...(missing.length ? { error: `queues not created yet: ${missing.join(", ")}` } : {}),
      };
    }
  } catch (error) {
    queue = { ok: false, error: (error as Error).message };
  }
  return Response.json({ status: queue.ok ? "ok" : "degraded", database, queue });
}
