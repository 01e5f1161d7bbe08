import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { download, runCsv, runFileName } from "@/lib/jobs/export";
import { resultOr409, runOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** One row per measure: estimate, interval, and each analytic reference's value. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const run = await runOr404(getDatabase(), access.workspace.id, id);
  return download(runCsv(resultOr409(run)), "text/csv", runFileName(run, "csv"));
});
