import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { runOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** Status, progress, and once finished the result (the shape of `simulate --json`) or the error. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  return Response.json(await runOr404(getDatabase(), access.workspace.id, id));
});
