import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { sweepOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** Status, progress, one run per point, and the curve, grid or dimensioning answer. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  return Response.json(await sweepOr404(getDatabase(), access.workspace.id, id));
});
