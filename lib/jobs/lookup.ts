import "server-only";
// The run or sweep a route names, as the API shows it, or a 404 (another workspace's looks missing too).
import type { Database } from "@/db/client";
import { findRun } from "@/db/queries/runs";
import { findSweep } from "@/db/queries/sweeps";
import { workerLiveness } from "@/db/queries/workers";
import { ApiError } from "@/lib/api/respond";
import { AccessError } from "@/lib/auth/access";
import { activeJobStatuses } from "@/lib/schemas/job-status";
import type { JobStatus, RunResponse, SweepResponse } from "./api-types";
import { sweepResponse, wire } from "./present";
import { noLiveWorkerMessage } from "./worker-heartbeat";

export async function runOr404(db: Database, workspaceId: string, runId: string): Promise<RunResponse> {
  const run = await findRun(db, workspaceId, runId);
  if (!run) throw new AccessError(404, "not-found", "No such run in this workspace.");
  return wire(run);
}

export async function sweepOr404(db: Database, workspaceId: string, sweepId: string): Promise<SweepResponse> {
  const sweep = await findSweep(db, workspaceId, sweepId);
  if (!sweep) throw new AccessError(404, "not-found", "No such sweep in this workspace.");
  return sweepResponse(sweep);
}

/**
 * Why a queued or running job is not moving: the no-live-worker message when no worker has reported within the
 * liveness window (workerLiveness, the rule health uses too); null when one has, or the job is finished.
 */
export async function workerNoticeFor(db: Database, status: JobStatus): Promise<string | null> {
  if (!(activeJobStatuses as readonly JobStatus[]).includes(status)) return null;
  const { live, windowSeconds } = await workerLiveness(db);
  return live > 0 ? null : noLiveWorkerMessage(windowSeconds);
}

/** Exports need something to export: a 409 until the run has a (possibly partial) result. */
export function resultOr409(run: RunResponse): NonNullable<RunResponse["result"]> {
  if (!run.result) throw new ApiError(409, "no-result-yet", `This run is ${run.status} and has no result to export${run.status === "failed" ? "" : " yet"}.`);
  return run.result;
}
