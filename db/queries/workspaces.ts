import { and, asc, eq } from "drizzle-orm";
import type { Database } from "../client";
import { memberships, workspaces } from "../schema";
import type { WorkspaceRole } from "@/lib/schemas/roles";

export interface WorkspaceMembership {
  workspace: typeof workspaces.$inferSelect;
  role: WorkspaceRole;
}

export async function findMembershipBySlug(db: Database, userId: string, slug: string): Promise<WorkspaceMembership | null> {
  const [row] = await db
    .select({ workspace: workspaces, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(and(eq(memberships.userId, userId), eq(workspaces.slug, slug)));
  return row ?? null;
}

export async function listWorkspacesForUser(db: Database, userId: string): Promise<WorkspaceMembership[]> {
  return db
    .select({ workspace: workspaces, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(workspaces.name));
}
