import { getDatabase } from "@/db/client";
import { createScenario, listScenarios } from "@/db/queries/scenarios";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import type { ScenarioListResponse, ScenarioResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { searchParamsObject } from "@/lib/schemas/paging";
import { scenarioCreateSchema, scenarioListQuerySchema } from "@/lib/schemas/scenarios";

type Context = { params: Promise<{ workspace: string }> };

/** ?q=words&sort=updated|created|name&order=asc|desc&limit=25&cursor=… */
export const GET = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read");
  const query = scenarioListQuerySchema.parse(searchParamsObject(request.url));
  const page: ScenarioListResponse = wire(await listScenarios(getDatabase(), access.workspace.id, query));
  return Response.json(page);
});

/** 201 with the scenario and its revision 1. */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "scenario.create");
  const input = scenarioCreateSchema.parse(await readJsonBody(request));
  const created: ScenarioResponse = wire(await createScenario(getDatabase(), { workspaceId: access.workspace.id, userId: access.user.id, ...input }));
  return Response.json(created, { status: 201 });
});
