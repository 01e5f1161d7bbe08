// Sweeps, grids and dimensioning searches as the web sees them: submit, list, read with their point runs, and
// cancel (cascading to the point runs). The worker's side (expanding points, advancing, summarising) is its own.
import { and, asc, count, eq, inArray, sql, type SQL } from "drizzle-orm";
import type { Database } from "../client";
import { runs, scenarioRevisions, scenarios, sweeps } from "../schema";
import { recordAudit } from "./audit";
import { afterCursor, keysetOrder, keysetText, pageFrom, type Keyset } from "./paging";
import { person, personColumns, withCreator } from "./scenarios";
import type { Transaction } from "./run-work";
import { activeJobStatuses } from "@/lib/schemas/job-status";
import type { SweepListQuery } from "@/lib/schemas/sweeps";
import type { Reference, Scenario, SimulationResult } from "@/lib/simulation";
import type { SweepDefinition, SweepSummary } from "@/lib/sweeps";

type Executor = Database | Transaction;

export interface NewSweep {
  workspaceId: string;
  userId: string;
  name: string;
  scenario: Scenario;
  definition: SweepDefinition;
  pointsPlanned: number;
  scenarioId: string | null;
  scenarioRevisionId: string | null;
  revision: number | null;
}

/** Inserts a queued sweep and its audit event, in the caller's transaction (which also queues sweep-start). */
export async function insertSweep(tx: Transaction, input: NewSweep): Promise<{ id: string; status: "queued" }> {
  const [row] = await tx
    .insert(sweeps)
    .values({
      workspaceId: input.workspaceId,
      kind: input.definition.kind,
      scenarioId: input.scenarioId,
      scenarioRevisionId: input.scenarioRevisionId,
      name: input.name,
      scenario: input.scenario,
      definition: input.definition as unknown as Record<string, unknown>,
      status: "queued",
      pointsPlanned: input.pointsPlanned,
      submittedBy: input.userId,
    })
    .returning({ id: sweeps.id });
  await recordAudit(tx, {
    workspaceId: input.workspaceId,
    actorUserId: input.userId,
    action: "sweep.submitted",
    subjectType: "sweep",
    subjectId: row.id,
    detail: { kind: input.definition.kind, scenarioId: input.scenarioId, revision: input.revision, points: input.pointsPlanned },
  });
  return { id: row.id, status: "queued" };
}

/** Sum of the point runs' progress fractions, per sweep (points without a run yet count 0). */
const pointProgress = sql<number>`coalesce((select sum(r.progress) from ${runs} r where r.sweep_id = ${sweeps.id}), 0)::float8`;

const listColumns = {
  id: sweeps.id,
  name: sweeps.name,
  kind: sweeps.kind,
  status: sweeps.status,
  pointsDone: sweeps.pointsDone,
  pointsPlanned: sweeps.pointsPlanned,
  pointProgress,
  scenarioId: sweeps.scenarioId,
  revision: scenarioRevisions.revision,
  scenarioName: scenarios.name,
  reviewStatus: sweeps.reviewStatus,
  createdAt: sweeps.createdAt,
  startedAt: sweeps.startedAt,
  finishedAt: sweeps.finishedAt,
  error: sweeps.error,
  creator: personColumns,
};

function listItem<R extends { status: string; pointsDone: number; pointsPlanned: number; pointProgress: number; creator: Parameters<typeof withCreator>[0]["creator"] }>(row: R) {
  const { pointsDone, pointsPlanned, pointProgress: progressSum, createdBy, ...rest } = withCreator(row);
  // A search plans at most maxProbes and usually needs fewer: once it is done, it is done.
  const fraction = row.status === "succeeded" ? 1 : Math.min(1, progressSum / Math.max(1, pointsPlanned));
  return { ...rest, progress: { pointsDone, pointsPlanned, fraction }, submittedBy: createdBy };
}

export async function listSweeps(db: Database, workspaceId: string, query: SweepListQuery) {
  const keyset: Keyset = { column: sweeps.createdAt, type: "timestamptz", id: sweeps.id, order: "desc" };
  const filters: (SQL | undefined)[] = [
    eq(sweeps.workspaceId, workspaceId),
    query.status ? inArray(sweeps.status, query.status) : undefined,
    query.kind ? eq(sweeps.kind, query.kind) : undefined,
    query.scenarioId ? eq(sweeps.scenarioId, query.scenarioId) : undefined,
  ];
  const [rows, [{ total }]] = await Promise.all([
    db
      .select({ ...listColumns, sortKey: keysetText(keyset) })
      .from(sweeps)
      .leftJoin(scenarios, eq(scenarios.id, sweeps.scenarioId))
      .leftJoin(scenarioRevisions, eq(scenarioRevisions.id, sweeps.scenarioRevisionId))
      .leftJoin(person, eq(person.id, sweeps.submittedBy))
      .where(and(...filters, afterCursor(keyset, query.cursor)))
      .orderBy(...keysetOrder(keyset))
      .limit(query.limit + 1),
    db.select({ total: count() }).from(sweeps).where(and(...filters)),
  ]);
  const page = pageFrom(rows, query.limit);
  return { items: page.rows.map(listItem), nextCursor: page.nextCursor, total };
}

/**
 * A sweep's point runs in point order, each with its result minus the per-replication arrays (a grid of 121
 * points must not ship 121 full results on every poll) and its stored references.
 */
export async function listSweepPoints(db: Executor, sweepId: string) {
  const rows = await db
    .select({
      runId: runs.id,
      point: runs.sweepPoint,
      values: runs.sweepValues,
      status: runs.status,
      replicationsDone: runs.replicationsDone,
      replicationsPlanned: runs.replicationsPlanned,
      fraction: runs.progress,
      partial: runs.partial,
      error: runs.error,
      result: sql<SimulationResult | null>`${runs.result} - 'perReplication' - 'occupancy'`,
      references: runs.references,
    })
    .from(runs)
    .where(eq(runs.sweepId, sweepId))
    .orderBy(asc(runs.sweepPoint));
  return rows.map((r) => ({ ...r, point: r.point ?? 0, values: r.values ?? {}, references: (r.references as Reference[] | null) ?? null }));
}
export type SweepPointRow = Awaited<ReturnType<typeof listSweepPoints>>[number];

/** One sweep with its definition, base scenario, stored summary and point runs; null when not in this workspace. */
export async function findSweep(db: Executor, workspaceId: string, sweepId: string) {
  const [row] = await db
    .select({ ...listColumns, definition: sweeps.definition, scenario: sweeps.scenario, result: sweeps.result })
    .from(sweeps)
    .leftJoin(scenarios, eq(scenarios.id, sweeps.scenarioId))
    .leftJoin(scenarioRevisions, eq(scenarioRevisions.id, sweeps.scenarioRevisionId))
    .leftJoin(person, eq(person.id, sweeps.submittedBy))
    .where(and(eq(sweeps.workspaceId, workspaceId), eq(sweeps.id, sweepId)));
  if (!row) return null;
  const { definition, scenario, result, ...rest } = listItem(row);
  return {
    ...rest,
    definition: definition as unknown as SweepDefinition,
    scenario: scenario as Scenario,
    stored: (result as SweepSummary | null) ?? null,
    points: await listSweepPoints(db, sweepId),
  };
}
export type SweepRecord = NonNullable<Awaited<ReturnType<typeof findSweep>>>;

/** `started`: the sweep had point runs (its start job had run), so the worker settles it and sends the cancel notice. */
export type SweepCancelOutcome = { kind: "cancelled"; id: string; runIds: string[]; started: boolean } | { kind: "finished"; status: string } | { kind: "missing" };

/**
 * queued|running -> cancelled, with its active point runs, and one audit event, in the caller's transaction
 * (which also queues a finalise job per cancelled point run so each keeps its partial result). The start job
 * inserts point runs under the sweep's row lock, which this update holds, so `started` is exact.
 */
export async function markSweepCancelled(tx: Transaction, params: { workspaceId: string; sweepId: string; userId: string | null }): Promise<SweepCancelOutcome> {
  const [row] = await tx
    .update(sweeps)
    .set({ status: "cancelled", finishedAt: sql`now()` })
    .where(and(eq(sweeps.workspaceId, params.workspaceId), eq(sweeps.id, params.sweepId), inArray(sweeps.status, [...activeJobStatuses])))
    .returning({ id: sweeps.id });
  if (!row) {
    const [existing] = await tx.select({ status: sweeps.status }).from(sweeps).where(and(eq(sweeps.workspaceId, params.workspaceId), eq(sweeps.id, params.sweepId)));
    return existing ? { kind: "finished", status: existing.status } : { kind: "missing" };
  }
  const cancelled = await tx
    .update(runs)
    .set({ status: "cancelled", finishedAt: sql`now()` })
    .where(and(eq(runs.sweepId, row.id), inArray(runs.status, [...activeJobStatuses])))
    .returning({ id: runs.id });
  const runIds = cancelled.map((r) => r.id);
  const [points] = await tx.select({ n: count() }).from(runs).where(eq(runs.sweepId, row.id));
  await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.userId, action: "sweep.cancelled", subjectType: "sweep", subjectId: row.id, detail: { pointRunsCancelled: runIds.length } });
  return { kind: "cancelled", id: row.id, runIds, started: (points?.n ?? 0) > 0 };
}
