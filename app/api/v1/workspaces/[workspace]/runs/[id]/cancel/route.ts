import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { cancelRun, queueClient } from "@/lib/jobs/submit";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** Queued or running -> cancelled; finished chunks become a partial result. 409 when the run has already ended. */
export const POST = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "run.create");
  return Response.json(await cancelRun(getDatabase(), await queueClient(), { workspaceId: access.workspace.id, userId: access.user.id }, id));
});
