import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { cancelSweep, queueClient } from "@/lib/jobs/submit";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** The sweep and its queued or running point runs -> cancelled; finished points stay. 409 once it has ended. */
export const POST = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "sweep.create");
  return Response.json(await cancelSweep(getDatabase(), await queueClient(), { workspaceId: access.workspace.id, userId: access.user.id }, id));
});
