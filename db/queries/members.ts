import { asc, eq } from "drizzle-orm";
import type { Database } from "../client";
import { memberships, users } from "../schema";

export async function listMembers(db: Database, workspaceId: string) {
  return db
    .select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, workspaceId))
    .orderBy(asc(users.email));
}
