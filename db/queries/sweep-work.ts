// The worker's reads and writes on sweeps and their point runs, with the sweep row locked.
import { and, asc, count, eq, inArray } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "../client";
import { runs, sweeps, workspaceQuotas, workspaces } from "../schema";
import { recordAudit } from "./audit";
import { transactionalSend, type JobSend, type Transaction } from "./run-work";

type Executor = Database | Transaction;

const sweepColumns = {
  id: sweeps.id,
  workspaceId: sweeps.workspaceId,
  kind: sweeps.kind,
  name: sweeps.name,
  scenario: sweeps.scenario,
  scenarioId: sweeps.scenarioId,
  scenarioRevisionId: sweeps.scenarioRevisionId,
  definition: sweeps.definition,
  status: sweeps.status,
  result: sweeps.result,
  submittedBy: sweeps.submittedBy,
};

export type WorkSweep = NonNullable<Awaited<ReturnType<typeof findSweepForWork>>>;

export async function findSweepForWork(db: Executor, sweepId: string) {
  const [row] = await db.select(sweepColumns).from(sweeps).where(eq(sweeps.id, sweepId));
  return row ?? null;
}

/** Runs `work` in a transaction holding the sweep's row lock; jobs sent through `send` commit with it. */
export async function withSweepLocked<T>(db: Database, boss: PgBoss, sweepId: string, work: (tx: Transaction, sweep: WorkSweep | null, send: JobSend) => Promise<T>): Promise<T> {
  return db.transaction(async (tx) => {
    const [sweep] = await tx.select(sweepColumns).from(sweeps).where(eq(sweeps.id, sweepId)).for("update");
    return work(tx, sweep ?? null, transactionalSend(tx, boss));
  });
}

export interface NewPointRun {
  point: number;
  values: Record<string, number>;
  scenario: Record<string, unknown>;
  seed: number;
  plan: Record<string, unknown>;
  replicationsPlanned: number;
}

/** Inserts point runs (queued) that do not exist yet; returns the ids of those inserted, by point. */
export async function insertPointRuns(tx: Executor, sweep: WorkSweep, points: NewPointRun[]): Promise<{ point: number; id: string }[]> {
  if (points.length === 0) return [];
  const rows = await tx
    .insert(runs)
    .values(
      points.map((p) => ({
        workspaceId: sweep.workspaceId,
        scenarioId: sweep.scenarioId,
        scenarioRevisionId: sweep.scenarioRevisionId,
        scenario: p.scenario,
        seed: p.seed,
        plan: p.plan,
        replicationsPlanned: p.replicationsPlanned,
        sweepId: sweep.id,
        sweepPoint: p.point,
        sweepValues: p.values,
        submittedBy: sweep.submittedBy,
      })),
    )
    .onConflictDoNothing()
    .returning({ point: runs.sweepPoint, id: runs.id });
  return rows.map((r) => ({ point: r.point!, id: r.id }));
}

/** The sweep's point runs in point order, with what the summary needs. */
export async function listPointRuns(db: Executor, sweepId: string) {
  return db
    .select({ runId: runs.id, point: runs.sweepPoint, values: runs.sweepValues, status: runs.status, result: runs.result, references: runs.references, error: runs.error, partial: runs.partial })
    .from(runs)
    .where(eq(runs.sweepId, sweepId))
    .orderBy(asc(runs.sweepPoint));
}

export async function markSweepStarted(tx: Executor, sweepId: string, pointsPlanned: number): Promise<void> {
  await tx.update(sweeps).set({ status: "running", startedAt: new Date(), pointsPlanned }).where(eq(sweeps.id, sweepId));
}

export async function updateSweepCounters(tx: Executor, sweepId: string, counters: { pointsDone: number; pointsPlanned: number }): Promise<void> {
  await tx.update(sweeps).set(counters).where(eq(sweeps.id, sweepId));
}

/** running -> succeeded|failed with its summary; once (the caller holds the lock and checked the status). */
export async function finishSweep(tx: Executor, sweep: WorkSweep, outcome: { status: "succeeded" | "failed"; result: Record<string, unknown> | null; error?: string; pointsDone: number }): Promise<void> {
  await tx
    .update(sweeps)
    .set({ status: outcome.status, result: outcome.result, error: outcome.error ?? null, pointsDone: outcome.pointsDone, finishedAt: new Date() })
    .where(eq(sweeps.id, sweep.id));
  await recordAudit(tx, {
    workspaceId: sweep.workspaceId,
    actorUserId: null,
    action: outcome.status === "succeeded" ? "sweep.succeeded" : "sweep.failed",
    subjectType: "sweep",
    subjectId: sweep.id,
    detail: outcome.error ? { error: outcome.error } : {},
  });
}

/** A cancelled sweep keeps the summary of the points that finished. */
export async function storeSweepPartialResult(tx: Executor, sweepId: string, result: Record<string, unknown>, pointsDone: number): Promise<void> {
  await tx.update(sweeps).set({ result, pointsDone }).where(eq(sweeps.id, sweepId));
}

/** Fails the sweep before any point ran (bad definition), with an audit event. */
export async function failSweep(tx: Executor, sweep: WorkSweep, message: string): Promise<boolean> {
  const rows = await tx
    .update(sweeps)
    .set({ status: "failed", error: message, finishedAt: new Date() })
    .where(and(eq(sweeps.id, sweep.id), inArray(sweeps.status, ["queued", "running"])))
    .returning({ id: sweeps.id });
  if (rows.length === 0) return false;
  await recordAudit(tx, { workspaceId: sweep.workspaceId, actorUserId: null, action: "sweep.failed", subjectType: "sweep", subjectId: sweep.id, detail: { error: message } });
  return true;
}

/** Points per sweep (probes per search) allowed in the workspace, when a quota row overrides the default. */
export async function findPointsQuota(db: Executor, workspaceId: string): Promise<number | null> {
  const [row] = await db.select({ points: workspaceQuotas.pointsPerSweep }).from(workspaceQuotas).where(eq(workspaceQuotas.workspaceId, workspaceId));
  return row?.points ?? null;
}

/** What a notice about a sweep says. */
export async function findSweepForNotice(db: Executor, sweepId: string) {
  const [row] = await db
    .select({
      id: sweeps.id,
      kind: sweeps.kind,
      name: sweeps.name,
      workspaceId: sweeps.workspaceId,
      workspaceSlug: workspaces.slug,
      workspaceName: workspaces.name,
      status: sweeps.status,
      error: sweeps.error,
      result: sweeps.result,
      pointsPlanned: sweeps.pointsPlanned,
      submittedBy: sweeps.submittedBy,
    })
    .from(sweeps)
    .innerJoin(workspaces, eq(workspaces.id, sweeps.workspaceId))
    .where(eq(sweeps.id, sweepId));
  return row ?? null;
}

/** Point runs of a sweep that finished in full (succeeded), and how many point runs it has. */
export async function countFinishedPoints(db: Executor, sweepId: string): Promise<{ finished: number; total: number }> {
  const rows = await db.select({ status: runs.status, n: count() }).from(runs).where(eq(runs.sweepId, sweepId)).groupBy(runs.status);
  return { finished: rows.find((r) => r.status === "succeeded")?.n ?? 0, total: rows.reduce((sum, r) => sum + r.n, 0) };
}
