import { getDatabase } from "@/db/client";
import { listSweeps } from "@/db/queries/sweeps";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import type { JobAccepted, SweepListResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { queueClient, submitSweep } from "@/lib/jobs/submit";
import { searchParamsObject } from "@/lib/schemas/paging";
import { sweepListQuerySchema, sweepSubmitSchema } from "@/lib/schemas/sweeps";

type Context = { params: Promise<{ workspace: string }> };

/** ?status=&kind=sweep|grid|dimensioning&scenarioId=&limit=&cursor=, newest first. */
export const GET = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read");
  const query = sweepListQuerySchema.parse(searchParamsObject(request.url));
  const page: SweepListResponse = wire(await listSweeps(getDatabase(), access.workspace.id, query));
  return Response.json(page);
});

/** `{ scenarioId | scenario, parameter, values }`, a grid or a dimensioning search: 202 `{ id, status }`. */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "sweep.create");
  const input = sweepSubmitSchema.parse(await readJsonBody(request));
  const accepted: JobAccepted = await submitSweep(getDatabase(), await queueClient(), { workspaceId: access.workspace.id, userId: access.user.id }, input);
  return Response.json(accepted, { status: 202, headers: { location: `/api/v1/workspaces/${access.workspace.slug}/sweeps/${accepted.id}` } });
});
