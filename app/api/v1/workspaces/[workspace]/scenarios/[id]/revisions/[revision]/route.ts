import { getDatabase } from "@/db/client";
import { findScenarioRevision } from "@/db/queries/scenarios";
import { AccessError } from "@/lib/auth/access";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import type { ScenarioRevisionResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { revisionNumberSchema } from "@/lib/schemas/scenarios";
import { z } from "zod";

type Context = { params: Promise<{ workspace: string; id: string; revision: string }> };

/** One revision with its document: exactly what a run of that revision simulated. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id, revision } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const number = z.object({ revision: revisionNumberSchema }).parse({ revision }).revision;
  const found = await findScenarioRevision(getDatabase(), access.workspace.id, id, number);
  if (!found) throw new AccessError(404, "not-found", "No such scenario revision in this workspace.");
  const { id: _rowId, ...rest } = found;
  const body: ScenarioRevisionResponse = wire(rest);
  return Response.json(body);
});
