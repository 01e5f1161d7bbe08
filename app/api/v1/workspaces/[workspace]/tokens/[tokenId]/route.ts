import { getDatabase } from "@/db/client";
import { revokeApiToken } from "@/db/queries/tokens";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { apiRoute, jsonError } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string; tokenId: string }> };

/** Revokes one of the caller's tokens (admins: anyone's in the workspace); 204, or 404 when there is no such open token. */
export const DELETE = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, tokenId } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const revoked = await revokeApiToken(getDatabase(), {
    workspaceId: access.workspace.id,
    tokenId,
    actorUserId: access.user.id,
    anyOwner: roleAllows(access.role, "member.manage"),
  });
  return revoked ? new Response(null, { status: 204 }) : jsonError(404, "not-found", "No such open token in this workspace.");
});
