// The worker's reads and writes on runs and their chunks. Every state change of a run happens with
// its row locked (SELECT ... FOR UPDATE) inside one transaction, so concurrent chunk completions,
// redelivered jobs and a cancel from the web serialise on the run and each change happens once.
import { and, asc, desc, eq, inArray, isNotNull, isNull, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "../client";
import { sendJob, jobsIn } from "../queue";
import { auditEvents, reviewComments, runChunks, runs, scenarios, userPreferences, users, workspaces } from "../schema";
import { recordAudit } from "./audit";
import type { Payload, QueueName } from "@/lib/jobs/contracts";

export type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];
type Executor = Database | Transaction;

export type WorkRun = Awaited<ReturnType<typeof findRunForWork>> & {};

const runColumns = {
  id: runs.id,
  workspaceId: runs.workspaceId,
  status: runs.status,
  scenario: runs.scenario,
  seed: runs.seed,
  plan: runs.plan,
  references: runs.references,
  result: runs.result,
  replicationsPlanned: runs.replicationsPlanned,
  sweepId: runs.sweepId,
  sweepPoint: runs.sweepPoint,
  submittedBy: runs.submittedBy,
};

export async function findRunForWork(db: Executor, runId: string) {
  const [row] = await db.select(runColumns).from(runs).where(eq(runs.id, runId));
  return row ?? null;
}

/**
 * Runs `work` in a transaction holding the run's row lock; `run` is null when the run is gone
 * (deleted with its workspace). Jobs sent through `send` commit with the transaction.
 */
export async function withRunLocked<T>(
  db: Database,
  boss: PgBoss,
  runId: string,
  work: (tx: Transaction, run: WorkRun | null, send: JobSend) => Promise<T>,
): Promise<T> {
  return db.transaction(async (tx) => {
    const [run] = await tx.select(runColumns).from(runs).where(eq(runs.id, runId)).for("update");
    return work(tx, run ?? null, transactionalSend(tx, boss));
  });
}

export type JobSend = <Q extends QueueName>(queue: Q, payload: Payload<Q>, options?: PgBoss.SendOptions) => Promise<string>;

export function transactionalSend(tx: Transaction, boss: PgBoss): JobSend {
  const db = jobsIn(tx);
  return (queue, payload, options = {}) => sendJob(boss, queue, payload, { ...options, db });
}

export interface ChunkRow {
  chunk: number;
  firstReplication: number;
  replications: number;
  done: boolean;
  progress: number;
}

/** The run's chunk rows in chunk order, without their aggregates. */
export async function listChunks(db: Executor, runId: string): Promise<ChunkRow[]> {
  return db
    .select({ chunk: runChunks.chunk, firstReplication: runChunks.firstReplication, replications: runChunks.replications, done: sql<boolean>`${runChunks.aggregate} is not null`, progress: runChunks.progress })
    .from(runChunks)
    .where(eq(runChunks.runId, runId))
    .orderBy(asc(runChunks.chunk));
}

/** Aggregates of the given finished chunks, keyed by chunk. */
export async function chunkAggregates(db: Executor, runId: string, chunks?: number[]): Promise<Map<number, Record<string, unknown>>> {
  const rows = await db
    .select({ chunk: runChunks.chunk, aggregate: runChunks.aggregate })
    .from(runChunks)
    .where(and(eq(runChunks.runId, runId), isNotNull(runChunks.aggregate), chunks ? inArray(runChunks.chunk, chunks) : undefined));
  return new Map(rows.map((r) => [r.chunk, r.aggregate!]));
}

/** Inserts chunk rows that do not exist yet; returns the chunks it inserted (their jobs are to be sent). */
export async function insertChunks(tx: Executor, runId: string, chunks: { chunk: number; firstReplication: number; replications: number }[]): Promise<number[]> {
  if (chunks.length === 0) return [];
  const inserted = await tx
    .insert(runChunks)
    .values(chunks.map((c) => ({ runId, ...c })))
    .onConflictDoNothing()
    .returning({ chunk: runChunks.chunk });
  return inserted.map((r) => r.chunk).sort((a, b) => a - b);
}

/** queued -> running, with the references computed once for the run. */
export async function markRunStarted(tx: Executor, runId: string, references: unknown[]): Promise<void> {
  await tx.update(runs).set({ status: "running", startedAt: new Date(), references }).where(eq(runs.id, runId));
}

/** A chunk attempt begins: counts the attempt and names the worker. Returns false when the chunk is already done. */
export async function markChunkStarted(db: Executor, runId: string, chunk: number, worker: string): Promise<boolean> {
  const rows = await db
    .update(runChunks)
    .set({ attempts: sql`${runChunks.attempts} + 1`, worker, startedAt: new Date(), progress: 0 })
    .where(and(eq(runChunks.runId, runId), eq(runChunks.chunk, chunk), isNull(runChunks.aggregate)))
    .returning({ attempts: runChunks.attempts });
  return rows.length > 0;
}

/**
 * Progress inside a running chunk: stores the chunk's fraction and the run's overall fraction
 * (finished chunks plus partial ones, over the planned replications) and returns the run's
 * status, so the caller notices a cancel at its next progress write.
 */
export async function writeChunkProgress(db: Database, runId: string, chunk: number, fraction: number): Promise<string | null> {
  const result = await db.execute<{ status: string }>(sql`
    with chunk_update as (
      update ${runChunks} set progress = ${fraction}
      where run_id = ${runId} and chunk = ${chunk} and aggregate is null
    )
    update ${runs} r set progress = least(1, greatest(r.progress, (
      select coalesce(sum(case when c.aggregate is not null then c.replications
                               when c.chunk = ${chunk} then c.replications * ${fraction}::float8
                               else c.replications * c.progress end), 0)
      from ${runChunks} c where c.run_id = ${runId}
    ) / greatest(1, r.replications_planned)))
    where r.id = ${runId}
    returning r.status::text as status`);
  return result.rows[0]?.status ?? null;
}

/** Stores a finished chunk's aggregate once; a redelivered chunk finds it stored and changes nothing. */
export async function storeChunkAggregate(tx: Executor, runId: string, chunk: number, aggregate: Record<string, unknown>): Promise<boolean> {
  const rows = await tx
    .update(runChunks)
    .set({ aggregate, progress: 1, finishedAt: new Date() })
    .where(and(eq(runChunks.runId, runId), eq(runChunks.chunk, chunk), isNull(runChunks.aggregate)))
    .returning({ chunk: runChunks.chunk });
  return rows.length > 0;
}

/** Counters shown while the run goes on: finished replications, planned replications, fraction done. */
export async function updateRunCounters(tx: Executor, runId: string, counters: { replicationsDone: number; replicationsPlanned: number }): Promise<void> {
  await tx
    .update(runs)
    .set({
      replicationsDone: counters.replicationsDone,
      replicationsPlanned: counters.replicationsPlanned,
      progress: sql`least(1, greatest(${runs.progress}, ${counters.replicationsDone}::float8 / greatest(1, ${counters.replicationsPlanned})))`,
    })
    .where(eq(runs.id, runId));
}

/** running -> succeeded with the folded result (the one place a finished run's numbers are written). */
export async function markRunSucceeded(tx: Executor, run: WorkRun, result: Record<string, unknown> & { replications: number }): Promise<void> {
  await tx
    .update(runs)
    .set({ status: "succeeded", result, progress: 1, replicationsDone: result.replications, replicationsPlanned: result.replications, finishedAt: new Date(), error: null })
    .where(eq(runs.id, run.id));
  await recordAudit(tx, { workspaceId: run.workspaceId, actorUserId: null, action: "run.succeeded", subjectType: "run", subjectId: run.id, detail: { replications: result.replications, stopReason: result.stopReason } });
}

/** A cancelled run keeps what its finished chunks give, clearly marked partial. */
export async function storePartialResult(tx: Executor, run: WorkRun, result: (Record<string, unknown> & { replications: number }) | null): Promise<void> {
  await tx
    .update(runs)
    .set({ result, partial: result !== null, replicationsDone: result?.replications ?? 0, finishedAt: sql`coalesce(${runs.finishedAt}, now())` })
    .where(eq(runs.id, run.id));
}

/** queued|running -> failed with the reason, and an audit event. Returns false when the run had already ended. */
export async function markRunFailed(tx: Executor, run: WorkRun, message: string, detail: Record<string, unknown> = {}): Promise<boolean> {
  const rows = await tx
    .update(runs)
    .set({ status: "failed", error: message, finishedAt: new Date() })
    .where(and(eq(runs.id, run.id), inArray(runs.status, ["queued", "running"])))
    .returning({ id: runs.id });
  if (rows.length === 0) return false;
  await recordAudit(tx, { workspaceId: run.workspaceId, actorUserId: null, action: "run.failed", subjectType: "run", subjectId: run.id, detail: { error: message, ...detail } });
  return true;
}

/** A chunk attempt threw and will be retried by the queue. */
export async function recordChunkRetry(db: Executor, run: WorkRun, detail: { chunk: number; attempt: number; retryLimit: number; error: string }): Promise<void> {
  await recordAudit(db, { workspaceId: run.workspaceId, actorUserId: null, action: "run.chunk-retried", subjectType: "run", subjectId: run.id, detail });
}

/** Who to tell about a run or sweep: the submitter's address, unless they turned notices off. */
export async function findNoticeRecipient(db: Executor, userId: string | null): Promise<{ email: string; name: string | null } | null> {
  if (!userId) return null;
  const [row] = await db
    .select({ email: users.email, name: users.name, notify: userPreferences.notifyByEmail })
    .from(users)
    .leftJoin(userPreferences, eq(userPreferences.userId, users.id))
    .where(eq(users.id, userId));
  if (!row || row.notify === false) return null;
  return { email: row.email, name: row.name };
}

/** What a notice about a run says. */
export async function findRunForNotice(db: Executor, runId: string) {
  const [row] = await db
    .select({
      id: runs.id,
      workspaceId: runs.workspaceId,
      workspaceSlug: workspaces.slug,
      workspaceName: workspaces.name,
      name: runs.name,
      status: runs.status,
      error: runs.error,
      result: runs.result,
      partial: runs.partial,
      replicationsDone: runs.replicationsDone,
      replicationsPlanned: runs.replicationsPlanned,
      submittedBy: runs.submittedBy,
      scenarioName: scenarios.name,
    })
    .from(runs)
    .innerJoin(workspaces, eq(workspaces.id, runs.workspaceId))
    .leftJoin(scenarios, eq(scenarios.id, runs.scenarioId))
    .where(eq(runs.id, runId));
  return row ?? null;
}

/** The name (or address) of whoever made the latest review decision on a run or sweep. */
export async function findLatestDecider(db: Executor, subjectType: "run" | "sweep", subjectId: string): Promise<string | null> {
  const [row] = await db
    .select({ name: users.name, email: users.email })
    .from(reviewComments)
    .leftJoin(users, eq(users.id, reviewComments.authorId))
    .where(and(eq(reviewComments.subjectType, subjectType), eq(reviewComments.subjectId, subjectId), isNotNull(reviewComments.decision)))
    .orderBy(desc(reviewComments.createdAt))
    .limit(1);
  return row ? (row.name ?? row.email ?? null) : null;
}

/**
 * Who cancelled a run or sweep, and when: its latest `run.cancelled` / `sweep.cancelled` audit event (the
 * cancel writes it in the same transaction). `userId` is null when the account has since been removed;
 * null when no cancel was recorded.
 */
export async function findCancellation(db: Executor, subjectType: "run" | "sweep", subjectId: string): Promise<{ userId: string | null; name: string | null; at: Date } | null> {
  const [row] = await db
    .select({ userId: auditEvents.actorUserId, name: users.name, email: users.email, at: auditEvents.createdAt })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .where(and(eq(auditEvents.subjectType, subjectType), eq(auditEvents.subjectId, subjectId), eq(auditEvents.action, `${subjectType}.cancelled`)))
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(1);
  return row ? { userId: row.userId, name: row.name ?? row.email ?? null, at: row.at } : null;
}
