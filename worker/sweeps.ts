// Sweep orchestration: point runs in, summary out. The pure parts live in lib/sweeps.
import { queues } from "../lib/jobs/contracts";
import { defaultQuotas } from "../lib/jobs/quotas";
import { parseScenario, planRun, type Reference, type Scenario, type SimulationResult } from "../lib/simulation/node";
import { curveOf, dimensioningOf, formulaServers, gridOf, nextProbe, parseSweepDefinition, probeMeets, probePoint, type PointRun, type SweepDefinition, type SweepPoint, type SweepSummary } from "../lib/sweeps";
import type { JobSend, Transaction } from "../db/queries/run-work";
import { findPointsQuota, finishSweep, insertPointRuns, listPointRuns, storeSweepPartialResult, updateSweepCounters, type WorkSweep } from "../db/queries/sweep-work";

/** Inserts the points' runs (queued, base seed: common random numbers) and queues their run-start jobs in the same transaction. */
export async function queuePoints(tx: Transaction, sweep: WorkSweep, points: SweepPoint[], send: JobSend): Promise<number> {
  const inserted = await insertPointRuns(
    tx,
    sweep,
    points.map((p) => {
      const plan = planRun(p.scenario);
      return {
        point: p.point,
        values: p.values,
        scenario: p.scenario as unknown as Record<string, unknown>,
        seed: p.scenario.run.seed,
        plan: plan as unknown as Record<string, unknown>,
        replicationsPlanned: plan.initialReplications,
      };
    }),
  );
  for (const run of inserted) await send(queues.runStart, { runId: run.id });
  return inserted.length;
}

type PointRow = Awaited<ReturnType<typeof listPointRuns>>[number];

function pointRun(row: PointRow): PointRun {
  return {
    runId: row.runId,
    point: row.point ?? 0,
    values: row.values ?? {},
    status: row.status,
    result: row.result as unknown as SimulationResult | null,
    references: row.references as Reference[] | null,
    error: row.error,
    partial: row.partial,
  };
}

const terminal = new Set(["succeeded", "failed", "cancelled"]);

function describePoint(run: PointRun): string {
  const values = Object.entries(run.values)
    .map(([k, v]) => `${k} = ${v}`)
    .join(", ");
  return `point ${run.point} (${values}) ${run.status === "cancelled" ? "was cancelled" : `failed: ${run.error ?? "no reason given"}`}`;
}

function summaryOf(definition: SweepDefinition, base: Scenario, runs: PointRun[], answer?: { servers: number } | { unresolved: string }): SweepSummary {
  switch (definition.kind) {
    case "sweep":
      return curveOf(definition, runs);
    case "grid":
      return gridOf(definition, runs);
    case "dimensioning":
      return dimensioningOf(definition, formulaServers(definition.formula, base, definition.targetBlocking), runs, answer ?? { unresolved: "the search did not finish" });
  }
}

/**
 * With the sweep locked, after one of its point runs ended: count, plan the next probe of a
 * dimensioning search, or finish the sweep with its summary (once: the status check under the lock).
 */
export async function advanceSweep(tx: Transaction, sweep: WorkSweep, send: JobSend): Promise<void> {
  const runs = (await listPointRuns(tx, sweep.id)).map(pointRun);
  const done = runs.filter((r) => terminal.has(r.status));
  const definition = parseSweepDefinition(sweep.definition);
  const base = parseScenario(sweep.scenario);
  const allDone = done.length === runs.length;
  if (sweep.status === "cancelled") {
    if (allDone && !sweep.result) {
      await storeSweepPartialResult(tx, sweep.id, summaryOf(definition, base, runs, { unresolved: "the search was cancelled" }) as unknown as Record<string, unknown>, done.length);
      // Once, with what was kept (the notice goes out only when someone other than the submitter cancelled).
      await send(queues.notify, { subject: "sweep", id: sweep.id, event: "cancelled" });
    }
    return;
  }
  if (sweep.status !== "running") return;
  if (!allDone) {
    await updateSweepCounters(tx, sweep.id, { pointsDone: done.length, pointsPlanned: runs.length });
    return;
  }
  const failed = runs.find((r) => r.status !== "succeeded");
  const finish = async (status: "succeeded" | "failed", answer?: { servers: number } | { unresolved: string }, error?: string) => {
    await finishSweep(tx, sweep, { status, result: summaryOf(definition, base, runs, answer) as unknown as Record<string, unknown>, error, pointsDone: done.length });
    await send(queues.notify, { subject: "sweep", id: sweep.id, event: status });
  };
  if (definition.kind !== "dimensioning") {
    await finish(failed ? "failed" : "succeeded", undefined, failed ? describePoint(failed) : undefined);
    return;
  }
  if (failed) {
    await finish("failed", { unresolved: describePoint(failed) }, describePoint(failed));
    return;
  }
  const formulaN = formulaServers(definition.formula, base, definition.targetBlocking);
  const quota = (await findPointsQuota(tx, sweep.workspaceId)) ?? defaultQuotas.pointsPerSweep;
  const maxProbes = Math.min(definition.maxProbes, quota);
  const decision = nextProbe(formulaN, runs.map((r) => ({ servers: r.values.servers, meets: probeMeets(r, definition) })), maxProbes);
  if (decision.kind === "probe") {
    await queuePoints(tx, sweep, [probePoint(base, definition, runs.length, decision.servers)], send);
    await updateSweepCounters(tx, sweep.id, { pointsDone: done.length, pointsPlanned: runs.length + 1 });
  } else if (decision.kind === "done") {
    await finish("succeeded", { servers: decision.servers });
  } else {
    await finish("failed", { unresolved: decision.message }, `the search stopped: ${decision.message}`);
  }
}
