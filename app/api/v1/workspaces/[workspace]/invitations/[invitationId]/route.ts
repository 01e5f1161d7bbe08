import { getDatabase } from "@/db/client";
import { findInvitationInWorkspace, revokeInvitation } from "@/db/queries/invitations";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, jsonError } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string; invitationId: string }> };

const notFound = () => jsonError(404, "not-found", "No such invitation in this workspace.");

export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, invitationId } = await params;
  const access = await requireWorkspaceAccess(workspace, "member.read");
  const invitation = await findInvitationInWorkspace(getDatabase(), access.workspace.id, invitationId);
  if (!invitation) return notFound();
  const { tokenHash: _secret, ...visible } = invitation;
  return Response.json({ invitation: visible });
});

/** Withdraws an open invitation. */
export const DELETE = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, invitationId } = await params;
  const access = await requireWorkspaceAccess(workspace, "member.invite");
  const revoked = await revokeInvitation(getDatabase(), { workspaceId: access.workspace.id, invitationId, actorUserId: access.user.id });
  return revoked ? new Response(null, { status: 204 }) : notFound();
});
