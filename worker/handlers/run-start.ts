// run-start: references once, then the first chunks (rows and jobs in one transaction).
import type { Payload } from "../../lib/jobs/contracts";
import { parseScenario, referencesFor, ScenarioError, type Scenario } from "../../lib/simulation/node";
import { findRunForWork, markRunStarted, withRunLocked } from "../../db/queries/run-work";
import type { WorkerContext } from "../context";
import { advanceRun, failRun } from "../runs";

export async function runStart(ctx: WorkerContext, { runId }: Payload<"run-start">): Promise<void> {
  const run = await findRunForWork(ctx.db, runId);
  if (!run || run.status !== "queued") return; // redelivered, cancelled or gone
  let scenario: Scenario;
  try {
    scenario = parseScenario(run.scenario);
  } catch (error) {
    if (error instanceof ScenarioError) {
      await failRun(ctx.db, ctx.boss, runId, `invalid scenario: ${error.message}`, { field: error.path });
      return;
    }
    throw error;
  }
  // Outside the lock: analytic methods can take a moment on large groups.
  const references = referencesFor(scenario);
  await withRunLocked(ctx.db, ctx.boss, runId, async (tx, locked, send) => {
    if (!locked || locked.status !== "queued") return;
    await markRunStarted(tx, runId, references);
    await advanceRun(ctx, tx, { ...locked, status: "running", references }, scenario, send);
  });
}
