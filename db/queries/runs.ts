// Runs as the web sees them: submit (insert + audit), list, read, cancel, and the workspace's quotas.
// The worker's side (chunks, progress, finalisation) is db/queries/run-work.ts.
import { and, count, eq, inArray, isNull, sql, type SQL } from "drizzle-orm";
import type { Database } from "../client";
import { runs, scenarioRevisions, scenarios, sweeps, workspaceQuotas } from "../schema";
import { recordAudit } from "./audit";
import { afterCursor, keysetOrder, keysetText, pageFrom, type Keyset } from "./paging";
import { person, personColumns, withCreator } from "./scenarios";
import type { Transaction } from "./run-work";
import { defaultQuotas, type Quotas } from "@/lib/jobs/quotas";
import { activeJobStatuses } from "@/lib/schemas/job-status";
import type { RunListQuery } from "@/lib/schemas/runs";
import type { RunPlan, Scenario, SimulationResult } from "@/lib/simulation";

type Executor = Database | Transaction;

/** The workspace's quotas: its workspace_quotas row, or the defaults. */
export async function findQuotas(db: Executor, workspaceId: string): Promise<Quotas> {
  const [row] = await db.select().from(workspaceQuotas).where(eq(workspaceQuotas.workspaceId, workspaceId));
  return row ? { concurrentRuns: row.concurrentRuns, callsPerRun: row.callsPerRun, pointsPerSweep: row.pointsPerSweep } : { ...defaultQuotas };
}

/**
 * Serialises submissions of one workspace until the transaction ends (a transaction-level advisory lock), so two
 * concurrent submissions cannot both see room under the concurrent-runs quota.
 */
export async function lockWorkspaceSubmissions(tx: Transaction, workspaceId: string): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`spillway.submit:${workspaceId}`}, 0))`);
}

/**
 * Runs holding (or about to hold) a worker slot: queued and running runs, plus the points a queued sweep will
 * start that have no run row yet.
 */
export async function countActiveRuns(db: Executor, workspaceId: string): Promise<number> {
  const result = await db.execute<{ active: number }>(sql`
    select (
      select count(*) from ${runs} where workspace_id = ${workspaceId} and status in ('queued', 'running')
    ) + (
      select coalesce(sum(greatest(0, s.points_planned - (select count(*) from ${runs} r where r.sweep_id = s.id))), 0)
      from ${sweeps} s where s.workspace_id = ${workspaceId} and s.status = 'queued' and s.kind <> 'dimensioning'
    ) as active`);
  return Number(result.rows[0]?.active ?? 0);
}

export interface NewRun {
  workspaceId: string;
  userId: string;
  name: string;
  scenario: Scenario;
  plan: RunPlan;
  scenarioId: string | null;
  scenarioRevisionId: string | null;
  revision: number | null;
}

/** Inserts a queued run and its audit event; pass the transaction so both commit with the job that starts it. */
export async function insertRun(tx: Transaction, input: NewRun): Promise<{ id: string; status: "queued" }> {
  const [row] = await tx
    .insert(runs)
    .values({
      workspaceId: input.workspaceId,
      scenarioId: input.scenarioId,
      scenarioRevisionId: input.scenarioRevisionId,
      name: input.name,
      scenario: input.scenario,
      seed: input.scenario.run.seed,
      plan: input.plan as unknown as Record<string, unknown>,
      status: "queued",
      replicationsPlanned: input.plan.initialReplications,
      submittedBy: input.userId,
    })
    .returning({ id: runs.id });
  await recordAudit(tx, {
    workspaceId: input.workspaceId,
    actorUserId: input.userId,
    action: "run.submitted",
    subjectType: "run",
    subjectId: row.id,
    detail: { scenarioId: input.scenarioId, revision: input.revision, seed: input.scenario.run.seed, replications: input.plan.initialReplications },
  });
  return { id: row.id, status: "queued" };
}

const listColumns = {
  id: runs.id,
  name: runs.name,
  status: runs.status,
  replicationsDone: runs.replicationsDone,
  replicationsPlanned: runs.replicationsPlanned,
  fraction: runs.progress,
  scenarioId: runs.scenarioId,
  revision: scenarioRevisions.revision,
  scenarioName: scenarios.name,
  seed: runs.seed,
  partial: runs.partial,
  sweepId: runs.sweepId,
  sweepPoint: runs.sweepPoint,
  sweepValues: runs.sweepValues,
  reviewStatus: runs.reviewStatus,
  createdAt: runs.createdAt,
  startedAt: runs.startedAt,
  finishedAt: runs.finishedAt,
  error: runs.error,
  creator: personColumns,
};

/** Progress as the API shows it, from the run's counters. */
function listItem<R extends { replicationsDone: number; replicationsPlanned: number; fraction: number; creator: Parameters<typeof withCreator>[0]["creator"] }>(row: R) {
  const { replicationsDone, replicationsPlanned, fraction, createdBy, ...rest } = withCreator(row);
  return { ...rest, progress: { replicationsDone, replicationsPlanned, fraction }, submittedBy: createdBy };
}

/** Runs of a workspace, newest first, one keyset page; a sweep's point runs only when asked for by `sweepId`. */
export async function listRuns(db: Database, workspaceId: string, query: RunListQuery) {
  const keyset: Keyset = { column: runs.createdAt, type: "timestamptz", id: runs.id, order: "desc" };
  const filters: (SQL | undefined)[] = [
    eq(runs.workspaceId, workspaceId),
    query.sweepId ? eq(runs.sweepId, query.sweepId) : isNull(runs.sweepId),
    query.status ? inArray(runs.status, query.status) : undefined,
    query.scenarioId ? eq(runs.scenarioId, query.scenarioId) : undefined,
  ];
  const [rows, [{ total }]] = await Promise.all([
    db
      .select({ ...listColumns, sortKey: keysetText(keyset) })
      .from(runs)
      .leftJoin(scenarios, eq(scenarios.id, runs.scenarioId))
      .leftJoin(scenarioRevisions, eq(scenarioRevisions.id, runs.scenarioRevisionId))
      .leftJoin(person, eq(person.id, runs.submittedBy))
      .where(and(...filters, afterCursor(keyset, query.cursor)))
      .orderBy(...keysetOrder(keyset))
      .limit(query.limit + 1),
    db.select({ total: count() }).from(runs).where(and(...filters)),
  ]);
  const page = pageFrom(rows, query.limit);
  return { items: page.rows.map(listItem), nextCursor: page.nextCursor, total };
}

/** One run with its scenario, plan and (once there is one) result; null when it is not in this workspace. */
export async function findRun(db: Executor, workspaceId: string, runId: string) {
  const [row] = await db
    .select({ ...listColumns, scenario: runs.scenario, plan: runs.plan, result: runs.result })
    .from(runs)
    .leftJoin(scenarios, eq(scenarios.id, runs.scenarioId))
    .leftJoin(scenarioRevisions, eq(scenarioRevisions.id, runs.scenarioRevisionId))
    .leftJoin(person, eq(person.id, runs.submittedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId)));
  if (!row) return null;
  const { result, scenario, plan, ...rest } = listItem(row);
  return { ...rest, scenario: scenario as Scenario, plan: plan as unknown as RunPlan, ...(result ? { result: result as unknown as SimulationResult } : {}) };
}
export type RunRecord = NonNullable<Awaited<ReturnType<typeof findRun>>>;

export type CancelOutcome = { kind: "cancelled"; id: string } | { kind: "finished"; status: string } | { kind: "missing" };

/**
 * queued|running -> cancelled with an audit event (in the caller's transaction, which also queues the finalise job
 * that folds the finished chunks into a partial result). A finished run is left as it is.
 */
export async function markRunCancelled(tx: Transaction, params: { workspaceId: string; runId: string; userId: string | null; reason?: string }): Promise<CancelOutcome> {
  const [row] = await tx
    .update(runs)
    .set({ status: "cancelled", finishedAt: sql`now()` })
    .where(and(eq(runs.workspaceId, params.workspaceId), eq(runs.id, params.runId), inArray(runs.status, [...activeJobStatuses])))
    .returning({ id: runs.id });
  if (row) {
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.userId, action: "run.cancelled", subjectType: "run", subjectId: row.id, detail: params.reason ? { reason: params.reason } : {} });
    return { kind: "cancelled", id: row.id };
  }
  const [existing] = await tx.select({ status: runs.status }).from(runs).where(and(eq(runs.workspaceId, params.workspaceId), eq(runs.id, params.runId)));
  return existing ? { kind: "finished", status: existing.status } : { kind: "missing" };
}
