import { getDatabase } from "@/db/client";
import { findScenario, reviseScenario } from "@/db/queries/scenarios";
import { AccessError } from "@/lib/auth/access";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import type { ScenarioResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { scenarioPatchSchema } from "@/lib/schemas/scenarios";

type Context = { params: Promise<{ workspace: string; id: string }> };

const missing = () => new AccessError(404, "not-found", "No such scenario in this workspace.");

export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const scenario = await findScenario(getDatabase(), access.workspace.id, id);
  if (!scenario) throw missing();
  const body: ScenarioResponse = wire(scenario);
  return Response.json(body);
});

/** A new `scenario` makes the next revision (runs keep pointing at theirs); name/description alone rename. */
export const PATCH = apiRoute<Context>(async (request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "scenario.create");
  const change = scenarioPatchSchema.parse(await readJsonBody(request));
  const scenario = await reviseScenario(getDatabase(), { workspaceId: access.workspace.id, scenarioId: id, userId: access.user.id, ...change });
  if (!scenario) throw missing();
  const body: ScenarioResponse = wire(scenario);
  return Response.json(body);
});
