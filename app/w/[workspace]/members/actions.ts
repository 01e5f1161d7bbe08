"use server";

import { revalidatePath } from "next/cache";
import { getDatabase } from "@/db/client";
import { revokeInvitation } from "@/db/queries/invitations";
import { changeMemberRole, removeMember } from "@/db/queries/members";
import { guardedAction } from "@/lib/auth/guarded-action";
import { invitationCreateSchema, memberRoleChangeSchema, type InvitationCreateInput } from "@/lib/schemas/invitation";
import { fieldErrors, type ActionResult } from "@/lib/schemas/validation";
import { inviteToWorkspace } from "@/lib/workspace/invite";

export async function inviteMemberAction(workspaceSlug: string, input: InvitationCreateInput): Promise<ActionResult<{ email: string }>> {
  const parsed = invitationCreateSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  return guardedAction<{ email: string }>(workspaceSlug, "member.invite", async (access) => {
    let invitation;
    try {
      invitation = await inviteToWorkspace(access, parsed.data);
    } catch (error) {
      if ((error as { kind?: unknown }).kind === "input") throw error;
      console.error(error);
      return { ok: false, message: "The invitation could not be sent, so none was created. Check the mail settings and try again." };
    }
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: { email: invitation.email }, message: `Invitation sent to ${invitation.email}.` };
  });
}

export async function revokeInvitationAction(workspaceSlug: string, invitationId: string): Promise<ActionResult> {
  return guardedAction(workspaceSlug, "member.invite", async (access) => {
    const revoked = await revokeInvitation(getDatabase(), { workspaceId: access.workspace.id, invitationId, actorUserId: access.user.id });
    if (!revoked) return { ok: false, message: "That invitation is not open any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: `Invitation for ${revoked.email} withdrawn.` };
  });
}

export async function changeMemberRoleAction(workspaceSlug: string, userId: string, input: { role: string }): Promise<ActionResult> {
  const parsed = memberRoleChangeSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Choose a role.", fields: fieldErrors(parsed.error) };
  return guardedAction(workspaceSlug, "member.manage", async (access) => {
    const changed = await changeMemberRole(getDatabase(), { workspaceId: access.workspace.id, userId, role: parsed.data.role, actorUserId: access.user.id });
    if (!changed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}`, "layout");
    return { ok: true, data: undefined, message: `Role changed to ${parsed.data.role}.` };
  });
}

export async function removeMemberAction(workspaceSlug: string, userId: string): Promise<ActionResult> {
  return guardedAction(workspaceSlug, "member.manage", async (access) => {
    const removed = await removeMember(getDatabase(), { workspaceId: access.workspace.id, userId, actorUserId: access.user.id });
    if (!removed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: "Member removed." };
  });
}
