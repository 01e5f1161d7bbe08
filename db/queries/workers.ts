// Worker heartbeats: each worker process keeps one row fresh (worker/heartbeat.ts); health and the run API ask
// `workerLiveness` whether any is alive. Every time is the database's clock (now()), so a worker on a machine
// whose clock is off is judged the same as one here; tests pass an explicit time instead of sleeping.
import { desc, eq, gte, lt, sql } from "drizzle-orm";
import type { Database } from "../client";
import { workerHeartbeats } from "../schema";
import { LIVENESS_WINDOW_SECONDS, PRUNE_AFTER_SECONDS } from "@/lib/jobs/worker-heartbeat";

export interface WorkerIdentity {
  /** host:pid */
  name: string;
  host: string;
  pid: number;
  threads: number;
}

/** An explicit instant (tests), or the database's now(). */
const instant = (at: Date | undefined) => (at ? sql`${at.toISOString()}::timestamptz` : sql`now()`);

/**
 * Inserts or refreshes the worker's row. `starting` also resets started_at (a restarted process may reuse a
 * host:pid, e.g. pid 1 in a container); `seenAt` stands in for the database's clock.
 */
export async function recordWorkerHeartbeat(db: Database, worker: WorkerIdentity, options: { starting?: boolean; seenAt?: Date } = {}): Promise<void> {
  const seen = instant(options.seenAt);
  await db
    .insert(workerHeartbeats)
    .values({ ...worker, startedAt: seen, lastSeenAt: seen })
    .onConflictDoUpdate({
      target: workerHeartbeats.name,
      set: {
        host: worker.host,
        pid: worker.pid,
        threads: worker.threads,
        lastSeenAt: seen,
        ...(options.starting ? { startedAt: seen } : {}),
      },
    });
}

/** Deletes the worker's row (a clean stop); true when there was one. */
export async function removeWorkerHeartbeat(db: Database, name: string): Promise<boolean> {
  const removed = await db.delete(workerHeartbeats).where(eq(workerHeartbeats.name, name)).returning({ name: workerHeartbeats.name });
  return removed.length > 0;
}

/** Deletes rows of workers silent for longer than `olderThanSeconds` (default a day); returns how many. */
export async function pruneDeadWorkers(db: Database, options: { olderThanSeconds?: number; now?: Date } = {}): Promise<number> {
  const cutoff = sql`${instant(options.now)} - make_interval(secs => ${options.olderThanSeconds ?? PRUNE_AFTER_SECONDS})`;
  const removed = await db.delete(workerHeartbeats).where(lt(workerHeartbeats.lastSeenAt, cutoff)).returning({ name: workerHeartbeats.name });
  return removed.length;
}

export interface LiveWorker {
  name: string;
  host: string;
  pid: number;
  threads: number;
  startedAt: Date;
  lastSeenAt: Date;
  /** Seconds since the last heartbeat, by the database's clock (rounded to 0.1 s). */
  seenSecondsAgo: number;
}

/** Workers seen within the window, most recently seen first. */
export async function listLiveWorkers(db: Database, options: { windowSeconds?: number; now?: Date } = {}): Promise<LiveWorker[]> {
  const now = instant(options.now);
  const rows = await db
    .select({
      name: workerHeartbeats.name,
      host: workerHeartbeats.host,
      pid: workerHeartbeats.pid,
      threads: workerHeartbeats.threads,
      startedAt: workerHeartbeats.startedAt,
      lastSeenAt: workerHeartbeats.lastSeenAt,
      seenSecondsAgo: sql<string>`extract(epoch from ${now} - ${workerHeartbeats.lastSeenAt})`,
    })
    .from(workerHeartbeats)
    .where(gte(workerHeartbeats.lastSeenAt, sql`${now} - make_interval(secs => ${options.windowSeconds ?? LIVENESS_WINDOW_SECONDS})`))
    .orderBy(desc(workerHeartbeats.lastSeenAt), workerHeartbeats.name);
  return rows.map((r) => ({ ...r, seenSecondsAgo: roundTenth(Number(r.seenSecondsAgo)) }));
}

export interface WorkerLiveness {
  /** How many workers were seen within the window. */
  live: number;
  windowSeconds: number;
  /** Seconds since any worker (live or not) last reported; null when none ever has (or all were pruned). */
  newestSeenSecondsAgo: number | null;
  workers: LiveWorker[];
}

/** The one liveness rule: is any worker alive (seen within the window), and when was the last one heard from. */
export async function workerLiveness(db: Database, options: { windowSeconds?: number; now?: Date } = {}): Promise<WorkerLiveness> {
  const windowSeconds = options.windowSeconds ?? LIVENESS_WINDOW_SECONDS;
  const [workers, [newest]] = await Promise.all([
    listLiveWorkers(db, { windowSeconds, now: options.now }),
    db.select({ ago: sql<string | null>`extract(epoch from ${instant(options.now)} - max(${workerHeartbeats.lastSeenAt}))` }).from(workerHeartbeats),
  ]);
  return { live: workers.length, windowSeconds, newestSeenSecondsAgo: newest.ago === null ? null : roundTenth(Number(newest.ago)), workers };
}

const roundTenth = (x: number) => Math.round(x * 10) / 10;

/** What went wrong with a heartbeat query, for logs and health: drizzle wraps the driver's error (its `cause`) in "Failed query: <sql>". */
export function heartbeatFailure(error: unknown): string {
  const cause = (error as { cause?: unknown })?.cause;
  return cause instanceof Error ? cause.message : (error as Error).message;
}
