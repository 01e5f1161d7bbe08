// sweep-start: expand the definition into point runs (a search: its first probe) and queue them.
import type { Payload } from "../../lib/jobs/contracts";
import { parseScenario, ScenarioError } from "../../lib/simulation/node";
import { expandSweep, parseSweepDefinition, SweepDefinitionError, type SweepPoint } from "../../lib/sweeps";
import { failSweep, findSweepForWork, markSweepStarted, withSweepLocked } from "../../db/queries/sweep-work";
import { queues } from "../../lib/jobs/contracts";
import type { WorkerContext } from "../context";
import { queuePoints } from "../sweeps";

export async function sweepStart(ctx: WorkerContext, { sweepId }: Payload<"sweep-start">): Promise<void> {
  const sweep = await findSweepForWork(ctx.db, sweepId);
  if (!sweep || sweep.status !== "queued") return;
  let points: SweepPoint[] | undefined;
  let refusal: string | undefined;
  try {
    points = expandSweep(parseScenario(sweep.scenario), parseSweepDefinition(sweep.definition));
  } catch (error) {
    if (!(error instanceof ScenarioError || error instanceof SweepDefinitionError)) throw error;
    refusal = error instanceof ScenarioError ? `invalid base scenario: ${error.message}` : error.message;
  }
  await withSweepLocked(ctx.db, ctx.boss, sweepId, async (tx, locked, send) => {
    if (!locked || locked.status !== "queued") return;
    if (!points) {
      if (await failSweep(tx, locked, refusal!)) await send(queues.notify, { subject: "sweep", id: sweepId, event: "failed" });
      return;
    }
    await queuePoints(tx, locked, points, send);
    await markSweepStarted(tx, sweepId, points.length);
  });
}
