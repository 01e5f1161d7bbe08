import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { download, runFileName } from "@/lib/jobs/export";
import { resultOr409, runOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** The whole run as a file: scenario, plan, seed, status and the result. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const run = await runOr404(getDatabase(), access.workspace.id, id);
  resultOr409(run);
  return download(`${JSON.stringify(run, null, 2)}\n`, "application/json", runFileName(run, "json"));
});
