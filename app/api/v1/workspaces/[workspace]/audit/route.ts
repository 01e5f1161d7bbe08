import { getDatabase } from "@/db/client";
import { listAuditEvents } from "@/db/queries/audit";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string }> };

export const GET = apiRoute<Context>(async (_request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "audit.read");
  return Response.json({ events: await listAuditEvents(getDatabase(), access.workspace.id) });
});
