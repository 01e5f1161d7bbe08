import { getDatabase } from "@/db/client";
import { listMembers } from "@/db/queries/members";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string }> };

export const GET = apiRoute<Context>(async (_request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "member.read");
  return Response.json({ members: await listMembers(getDatabase(), access.workspace.id) });
});
