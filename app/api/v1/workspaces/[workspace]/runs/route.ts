import { getDatabase } from "@/db/client";
import { listRuns } from "@/db/queries/runs";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import type { JobAccepted, RunListResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { queueClient, submitRun } from "@/lib/jobs/submit";
import { searchParamsObject } from "@/lib/schemas/paging";
import { runListQuerySchema, runSubmitSchema } from "@/lib/schemas/runs";

type Context = { params: Promise<{ workspace: string }> };

/** ?status=queued,running&scenarioId=&sweepId=&limit=25&cursor=…, newest first. */
export const GET = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read");
  const query = runListQuerySchema.parse(searchParamsObject(request.url));
  const page: RunListResponse = wire(await listRuns(getDatabase(), access.workspace.id, query));
  return Response.json(page);
});

/** `{ scenarioId, revision? }` or `{ scenario }` (+ `name`): 202 `{ id, status }`; the worker does the rest. */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "run.create");
  const input = runSubmitSchema.parse(await readJsonBody(request));
  const accepted: JobAccepted = await submitRun(getDatabase(), await queueClient(), { workspaceId: access.workspace.id, userId: access.user.id }, input);
  return Response.json(accepted, { status: 202, headers: { location: `/api/v1/workspaces/${access.workspace.slug}/runs/${accepted.id}` } });
});
