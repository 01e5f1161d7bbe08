import "server-only";
// Submitting and cancelling background work from the web: validate, check quotas, then insert the row, its
// audit event and its first job in ONE transaction (pg-boss writes the job through the same connection), so a
// run either exists and is queued, or nothing was stored. The web process never simulates.
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { getBoss } from "@/db/queue";
import { transactionalSend, type JobSend, type Transaction } from "@/db/queries/run-work";
import { countActiveRuns, findQuotas, insertRun, lockWorkspaceSubmissions, markRunCancelled } from "@/db/queries/runs";
import { findScenarioRevision } from "@/db/queries/scenarios";
import { insertSweep, markSweepCancelled } from "@/db/queries/sweeps";
import { RecordInputError } from "@/db/queries/errors";
import { ApiError } from "@/lib/api/respond";
import { AccessError } from "@/lib/auth/access";
import { queues } from "./contracts";
import { checkCallsPerRun, checkPointsPerSweep, concurrencyRefusal, slotsNeeded } from "./quota-checks";
import type { JobAccepted } from "./api-types";
import type { RunSubmit } from "@/lib/schemas/runs";
import type { SweepSubmit } from "@/lib/schemas/sweeps";
import { parseScenario, planRun, ScenarioError, type Scenario } from "@/lib/simulation";
import { expandSweep, SweepDefinitionError, type SweepDefinition } from "@/lib/sweeps";

/** Who submits, where. */
export interface Submitter {
  workspaceId: string;
  userId: string;
}

/** The web process's queue client; a queue that cannot be reached is a 503 (nothing was stored), not a 500. */
export async function queueClient(): Promise<PgBoss> {
  try {
    return await getBoss();
  } catch (error) {
    throw queueUnavailable(error);
  }
}

const queueUnavailable = (error: unknown) =>
  new ApiError(503, "queue-unavailable", `The job queue is not available (${(error as Error).message}); nothing was stored, try again shortly.`);

interface ResolvedScenario {
  scenario: Scenario;
  scenarioId: string | null;
  scenarioRevisionId: string | null;
  revision: number | null;
}

/** The scenario to simulate: a stored revision of this workspace (the newest unless one is named), or the inline one. */
async function resolveScenario(db: Database, workspaceId: string, source: { scenarioId?: string; revision?: number; scenario?: Scenario }): Promise<ResolvedScenario> {
  if (source.scenario) return { scenario: source.scenario, scenarioId: null, scenarioRevisionId: null, revision: null };
  const found = await findScenarioRevision(db, workspaceId, source.scenarioId!, source.revision);
  if (!found) {
    const exists = source.revision !== undefined && (await findScenarioRevision(db, workspaceId, source.scenarioId!));
    throw exists
      ? new RecordInputError(`scenario ${source.scenarioId} has no revision ${source.revision} (the newest is ${exists.revision})`, "revision")
      : new RecordInputError(`no scenario ${source.scenarioId} in this workspace`, "scenarioId");
  }
  try {
    // Revisions were valid when stored; re-validating guards against documents from an older schema.
    return { scenario: parseScenario(found.scenario), scenarioId: found.scenarioId, scenarioRevisionId: found.id, revision: found.revision };
  } catch (error) {
    if (error instanceof ScenarioError) throw new RecordInputError(`revision ${found.revision} is no longer a valid scenario: ${error.message}; save a corrected revision`, "revision");
    throw error;
  }
}

/**
 * In one transaction: serialise this workspace's submissions, check the concurrent-runs quota, insert, queue.
 * A queue that refuses the job rolls everything back (no orphan queued run) and answers 503.
 */
async function enqueue(db: Database, boss: PgBoss, submitter: Submitter, slots: number, insert: (tx: Transaction, send: JobSend) => Promise<JobAccepted>): Promise<JobAccepted> {
  const quotas = await findQuotas(db, submitter.workspaceId);
  return db.transaction(async (tx) => {
    await lockWorkspaceSubmissions(tx, submitter.workspaceId);
    const refusal = concurrencyRefusal(await countActiveRuns(tx, submitter.workspaceId), slots, quotas);
    if (refusal) throw new ApiError(429, "quota-exceeded", refusal);
    return insert(tx, sendOr503(tx, boss));
  });
}

/** Sends inside the transaction; whatever stops the job being written is the queue's failure (503), and rolls back. */
function sendOr503(tx: Transaction, boss: PgBoss): JobSend {
  const send = transactionalSend(tx, boss);
  return async (queue, payload, options) => {
    try {
      return await send(queue, payload, options);
    } catch (error) {
      throw queueUnavailable(error);
    }
  };
}

/** POST …/runs: validate, check quotas, store the queued run and its run-start job together. */
export async function submitRun(db: Database, boss: PgBoss, submitter: Submitter, input: RunSubmit): Promise<JobAccepted> {
  const source = await resolveScenario(db, submitter.workspaceId, input);
  checkCallsPerRun(source.scenario, await findQuotas(db, submitter.workspaceId), !!input.scenario);
  const plan = planRun(source.scenario);
  return enqueue(db, boss, submitter, 1, async (tx, send) => {
    const run = await insertRun(tx, { ...submitter, ...source, name: input.name, plan });
    await send(queues.runStart, { runId: run.id });
    return run;
  });
}

/** POST …/sweeps: the definition, its points and their scenarios checked up front; then one sweep-start job. */
export async function submitSweep(db: Database, boss: PgBoss, submitter: Submitter, input: SweepSubmit): Promise<JobAccepted> {
  const source = await resolveScenario(db, submitter.workspaceId, input);
  const quotas = await findQuotas(db, submitter.workspaceId);
  const definition: SweepDefinition = input.definition;
  const pointsPlanned = checkPointsPerSweep(definition, quotas);
  let points;
  try {
    points = expandSweep(source.scenario, definition);
  } catch (error) {
    if (error instanceof SweepDefinitionError) throw new RecordInputError(error.message, error.field);
    throw error;
  }
  // Every point must fit the calls-per-run quota (a search's probes differ only in servers: the first stands for all).
  for (const point of points) checkCallsPerRun(point.scenario, quotas, !!input.scenario, `point ${point.point} (${describeValues(point.values)})`);
  return enqueue(db, boss, submitter, slotsNeeded(definition), async (tx, send) => {
    const sweep = await insertSweep(tx, { ...submitter, ...source, name: input.name, definition, pointsPlanned });
    await send(queues.sweepStart, { sweepId: sweep.id });
    return sweep;
  });
}

const describeValues = (values: Record<string, number>) => Object.entries(values).map(([k, v]) => `${k} = ${v}`).join(", ");

const notFound = (what: string) => new AccessError(404, "not-found", `No such ${what} in this workspace.`);
const alreadyFinished = (what: string, status: string) => new ApiError(409, "already-finished", `This ${what} has already ${status === "cancelled" ? "been cancelled" : status}; only queued or running work can be cancelled.`);

/** POST …/runs/{id}/cancel: cancelled + audit + a run-finalise job that keeps the finished chunks as a partial result. */
export async function cancelRun(db: Database, boss: PgBoss, submitter: Submitter, runId: string): Promise<JobAccepted> {
  return db.transaction(async (tx) => {
    const outcome = await markRunCancelled(tx, { workspaceId: submitter.workspaceId, runId, userId: submitter.userId });
    if (outcome.kind === "missing") throw notFound("run");
    if (outcome.kind === "finished") throw alreadyFinished("run", outcome.status);
    await sendOr503(tx, boss)(queues.runFinalise, { runId });
    return { id: runId, status: "cancelled" };
  });
}

/**
 * POST …/sweeps/{id}/cancel: the sweep and its active point runs, each point run then finalised as partial (the
 * worker sends the cancel notice once the last one is). A sweep cancelled before it started has no point runs
 * to wait for: its notice is queued here.
 */
export async function cancelSweep(db: Database, boss: PgBoss, submitter: Submitter, sweepId: string): Promise<JobAccepted> {
  return db.transaction(async (tx) => {
    const outcome = await markSweepCancelled(tx, { workspaceId: submitter.workspaceId, sweepId, userId: submitter.userId });
    if (outcome.kind === "missing") throw notFound("sweep");
    if (outcome.kind === "finished") throw alreadyFinished("sweep", outcome.status);
    const send = sendOr503(tx, boss);
    for (const runId of outcome.runIds) await send(queues.runFinalise, { runId });
    if (!outcome.started) await send(queues.notify, { subject: "sweep", id: sweepId, event: "cancelled" });
    return { id: sweepId, status: "cancelled" };
  });
}
