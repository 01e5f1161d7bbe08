import { getDatabase } from "@/db/client";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { requireUser } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";

/** The workspaces the caller belongs to, with the caller's role in each. */
export const GET = apiRoute(async () => {
  const user = await requireUser();
  const memberships = await listWorkspacesForUser(getDatabase(), user.id);
  return Response.json({
    workspaces: memberships.map((m) => ({ slug: m.workspace.slug, name: m.workspace.name, role: m.role, safetyCritical: m.workspace.safetyCritical })),
  });
});
