import { getDatabase } from "@/db/client";
import { changeMemberRole, removeMember } from "@/db/queries/members";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, jsonError, readJsonBody } from "@/lib/api/respond";
import { memberRoleChangeSchema } from "@/lib/schemas/invitation";

type Context = { params: Promise<{ workspace: string; userId: string }> };

const notFound = () => jsonError(404, "not-found", "No such member in this workspace.");

/** PATCH { role } changes a member's role. */
export const PATCH = apiRoute<Context>(async (request, { params }) => {
  const { workspace, userId } = await params;
  const access = await requireWorkspaceAccess(workspace, "member.manage");
  const { role } = memberRoleChangeSchema.parse(await readJsonBody(request, 10_000));
  const changed = await changeMemberRole(getDatabase(), { workspaceId: access.workspace.id, userId, role, actorUserId: access.user.id });
  return changed ? Response.json({ member: { userId, role: changed.role } }) : notFound();
});

export const DELETE = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, userId } = await params;
  const access = await requireWorkspaceAccess(workspace, "member.manage");
  const removed = await removeMember(getDatabase(), { workspaceId: access.workspace.id, userId, actorUserId: access.user.id });
  return removed ? new Response(null, { status: 204 }) : notFound();
});
