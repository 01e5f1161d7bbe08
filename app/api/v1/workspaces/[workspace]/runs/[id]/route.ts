import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { runOr404, workerNoticeFor } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/**
 * Status, progress, and once finished the result (the shape of `simulate --json`) or the error; while queued or
 * running, `workerNotice` says when no worker is alive to move it.
 */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const db = getDatabase();
  const run = await runOr404(db, access.workspace.id, id);
  return Response.json({ ...run, workerNotice: await workerNoticeFor(db, run.status) });
});
