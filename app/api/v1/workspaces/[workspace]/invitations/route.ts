import { getDatabase } from "@/db/client";
import { listOpenInvitations } from "@/db/queries/invitations";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import { invitationCreateSchema } from "@/lib/schemas/invitation";
import { inviteToWorkspace } from "@/lib/workspace/invite";

type Context = { params: Promise<{ workspace: string }> };

export const GET = apiRoute<Context>(async (_request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "member.read");
  return Response.json({ invitations: await listOpenInvitations(getDatabase(), access.workspace.id) });
});

/** Creates an invitation and e-mails its link; 201 with the invitation (never the token). */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "member.invite");
  const input = invitationCreateSchema.parse(await readJsonBody(request, 10_000));
  const invitation = await inviteToWorkspace(access, input);
  return Response.json(
    { invitation: { id: invitation.id, email: invitation.email, role: invitation.role, expiresAt: invitation.expiresAt } },
    { status: 201 },
  );
});
