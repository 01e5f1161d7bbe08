import { getDatabase } from "@/db/client";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { requireCaller } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";

/** The workspaces the caller belongs to, with the caller's role in each; an API token sees only its own workspace. */
export const GET = apiRoute(async () => {
  const caller = await requireCaller();
  const all = await listWorkspacesForUser(getDatabase(), caller.user.id);
  const memberships = caller.via === "token" ? all.filter((m) => m.workspace.id === caller.grant.workspace.id) : all;
  return Response.json({
    workspaces: memberships.map((m) => ({ slug: m.workspace.slug, name: m.workspace.name, role: m.role, safetyCritical: m.workspace.safetyCritical })),
  });
});
