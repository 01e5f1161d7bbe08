import "server-only";
import { getDatabase } from "@/db/client";
import { createInvitation } from "@/db/queries/invitations";
import { invitationMail } from "@/lib/mail/messages";
import { sendMail } from "@/lib/mail/transport";
import { appUrl } from "@/lib/config";
import type { WorkspaceAccess } from "@/lib/auth/guard";
import type { z } from "zod";
import type { invitationCreateSchema } from "@/lib/schemas/invitation";


/** Creates the invitation and e-mails its link; both or neither. */
export async function inviteToWorkspace(access: WorkspaceAccess, input: z.output<typeof invitationCreateSchema>) {
  const { invitation } = await createInvitation(
    getDatabase(),
    { workspaceId: access.workspace.id, email: input.email, role: input.role, invitedBy: access.user.id },
    (token, created) =>
      sendMail(
        invitationMail({
          to: created.email,
          url: `${appUrl()}/invitations/${token}`,
          workspaceId: access.workspace.id,
          workspaceName: access.workspace.name,
          role: created.role,
          invitedBy: access.user.name ?? access.user.email,
          expiresAt: created.expiresAt,
        }),
      ),
  );
  return invitation;
}
