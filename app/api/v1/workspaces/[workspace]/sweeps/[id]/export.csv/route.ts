import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { download, sweepCsv, sweepFileName } from "@/lib/jobs/export";
import { sweepOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** One row per point (the points so far while it runs). */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const sweep = await sweepOr404(getDatabase(), access.workspace.id, id);
  return download(sweepCsv(sweep), "text/csv", sweepFileName(sweep, "csv"));
});
