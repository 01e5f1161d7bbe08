import { getDatabase } from "@/db/client";
import { listScenarioRevisions } from "@/db/queries/scenarios";
import { AccessError } from "@/lib/auth/access";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import type { ScenarioRevisionsResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** Every revision, newest first, without their documents. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const revisions = await listScenarioRevisions(getDatabase(), access.workspace.id, id);
  if (!revisions) throw new AccessError(404, "not-found", "No such scenario in this workspace.");
  const body: ScenarioRevisionsResponse = wire({ revisions });
  return Response.json(body);
});
