import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { download, sweepFileName } from "@/lib/jobs/export";
import { sweepOr404 } from "@/lib/jobs/lookup";

type Context = { params: Promise<{ workspace: string; id: string }> };

/** The whole sweep as a file: definition, base scenario, points and summary. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, id } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const sweep = await sweepOr404(getDatabase(), access.workspace.id, id);
  return download(`${JSON.stringify(sweep, null, 2)}\n`, "application/json", sweepFileName(sweep, "json"));
});
