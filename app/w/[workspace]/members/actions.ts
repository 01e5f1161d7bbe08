"use server";

import { revalidatePath } from "next/cache";
import { getDatabase } from "@/db/client";
import { InvitationError, revokeInvitation } from "@/db/queries/invitations";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { AccessError } from "@/lib/auth/access";
import { invitationCreateSchema, memberRoleChangeSchema, type InvitationCreateInput } from "@/lib/schemas/invitation";
import { changeMemberRole, MembershipError, removeMember } from "@/db/queries/members";
import { fieldErrors, type ActionResult } from "@/lib/schemas/validation";
import { inviteToWorkspace } from "@/lib/workspace/invite";

export async function inviteMemberAction(workspaceSlug: string, input: InvitationCreateInput): Promise<ActionResult<{ email: string }>> {
  const parsed = invitationCreateSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  try {
    const access = await requireWorkspaceAccess(workspaceSlug, "member.invite");
    const invitation = await inviteToWorkspace(access, parsed.data);
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: { email: invitation.email }, message: `Invitation sent to ${invitation.email}.` };
  } catch (error) {
    if (error instanceof AccessError) return { ok: false, message: error.message };
    if (error instanceof InvitationError) return { ok: false, message: error.message, fields: { [error.field]: error.message } };
    console.error(error);
    return { ok: false, message: "The invitation could not be sent, so none was created. Check the mail settings and try again." };
  }
}

export async function revokeInvitationAction(workspaceSlug: string, invitationId: string): Promise<ActionResult> {
  try {
    const access = await requireWorkspaceAccess(workspaceSlug, "member.invite");
    const revoked = await revokeInvitation(getDatabase(), { workspaceId: access.workspace.id, invitationId, actorUserId: access.user.id });
    if (!revoked) return { ok: false, message: "That invitation is not open any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: `Invitation for ${revoked.email} withdrawn.` };
  } catch (error) {
    if (error instanceof AccessError) return { ok: false, message: error.message };
    throw error;
  }
}

export async function changeMemberRoleAction(workspaceSlug: string, userId: string, input: { role: string }): Promise<ActionResult> {
  const parsed = memberRoleChangeSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Choose a role.", fields: fieldErrors(parsed.error) };
  try {
    const access = await requireWorkspaceAccess(workspaceSlug, "member.manage");
    const changed = await changeMemberRole(getDatabase(), { workspaceId: access.workspace.id, userId, role: parsed.data.role, actorUserId: access.user.id });
    if (!changed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}`, "layout");
    return { ok: true, data: undefined, message: `Role changed to ${parsed.data.role}.` };
  } catch (error) {
    if (error instanceof AccessError || error instanceof MembershipError) return { ok: false, message: error.message };
    throw error;
  }
}

export async function removeMemberAction(workspaceSlug: string, userId: string): Promise<ActionResult> {
  try {
    const access = await requireWorkspaceAccess(workspaceSlug, "member.manage");
    const removed = await removeMember(getDatabase(), { workspaceId: access.workspace.id, userId, actorUserId: access.user.id });
    if (!removed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: "Member removed." };
  } catch (error) {
    if (error instanceof AccessError || error instanceof MembershipError) return { ok: false, message: error.message };
    throw error;
  }
}
