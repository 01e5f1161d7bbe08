"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDatabase } from "@/db/client";
import { revokeInvitation } from "@/db/queries/invitations";
import { changeMemberRole, removeMember } from "@/db/queries/members";
import { guardedAction } from "@/lib/auth/guarded-action";
import { invitationCreateSchema, memberRoleChangeSchema, type InvitationCreateInput } from "@/lib/schemas/invitation";
import type { ActionResult } from "@/lib/schemas/validation";
import { inviteToWorkspace } from "@/lib/workspace/invite";

const recordId = z.string().min(1).max(100);

export async function inviteMemberAction(workspaceSlug: string, input: InvitationCreateInput): Promise<ActionResult<{ email: string }>> {
  return guardedAction<typeof invitationCreateSchema, { email: string }>(workspaceSlug, "member.invite", invitationCreateSchema, input, async (access, value) => {
    let invitation;
    try {
      invitation = await inviteToWorkspace(access, value);
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
  return guardedAction(workspaceSlug, "member.invite", recordId, invitationId, async (access, id) => {
    const revoked = await revokeInvitation(getDatabase(), { workspaceId: access.workspace.id, invitationId: id, actorUserId: access.user.id });
    if (!revoked) return { ok: false, message: "That invitation is not open any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: `Invitation for ${revoked.email} withdrawn.` };
  });
}

export async function changeMemberRoleAction(workspaceSlug: string, userId: string, input: { role: string }): Promise<ActionResult> {
  const schema = memberRoleChangeSchema.extend({ userId: recordId });
  return guardedAction(workspaceSlug, "member.manage", schema, { ...input, userId }, async (access, value) => {
    const changed = await changeMemberRole(getDatabase(), { workspaceId: access.workspace.id, userId: value.userId, role: value.role, actorUserId: access.user.id });
    if (!changed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}`, "layout");
    return { ok: true, data: undefined, message: `Role changed to ${value.role}.` };
  });
}

export async function removeMemberAction(workspaceSlug: string, userId: string): Promise<ActionResult> {
  return guardedAction(workspaceSlug, "member.manage", recordId, userId, async (access, id) => {
    const removed = await removeMember(getDatabase(), { workspaceId: access.workspace.id, userId: id, actorUserId: access.user.id });
    if (!removed) return { ok: false, message: "That person is not a member any more." };
    revalidatePath(`/w/${workspaceSlug}/members`);
    return { ok: true, data: undefined, message: "Member removed." };
  });
}
