import { and, asc, eq } from "drizzle-orm";
import type { Database } from "../client";
import { memberships, users } from "../schema";
import { recordAudit } from "./audit";
import { RecordInputError } from "./errors";
import { endSessionsIfNoWorkspace } from "./users";
import type { WorkspaceRole } from "@/lib/schemas/roles";

export async function listMembers(db: Database, workspaceId: string) {
  return db
    .select({ userId: users.id, email: users.email, name: users.name, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, workspaceId))
    .orderBy(asc(users.email));
}

export class MembershipError extends RecordInputError {
  constructor(message: string, field = "role") {
    super(message, field);
  }
}

async function lockAdmins(tx: Parameters<Parameters<Database["transaction"]>[0]>[0], workspaceId: string) {
  // Row locks on the admin memberships serialise concurrent demotions, so the last admin cannot vanish.
  const admins = await tx
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.role, "admin")))
    .for("update");
  return admins.map((a) => a.userId);
}

/** Changes a member's role; refuses to leave the workspace without an admin. */
export async function changeMemberRole(db: Database, params: { workspaceId: string; userId: string; role: WorkspaceRole; actorUserId: string }) {
  return db.transaction(async (tx) => {
    const admins = await lockAdmins(tx, params.workspaceId);
    const [current] = await tx.select().from(memberships).where(and(eq(memberships.workspaceId, params.workspaceId), eq(memberships.userId, params.userId)));
    if (!current) return null;
    if (current.role === "admin" && params.role !== "admin" && admins.length === 1) {
      throw new MembershipError("This is the workspace's only admin; make someone else admin first.");
    }
    await tx.update(memberships).set({ role: params.role }).where(and(eq(memberships.workspaceId, params.workspaceId), eq(memberships.userId, params.userId)));
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.actorUserId, action: "member.role-changed", subjectType: "user", subjectId: params.userId, detail: { from: current.role, to: params.role } });
    return { ...current, role: params.role };
  });
}

/** Removes a member; refuses to remove the only admin. */
export async function removeMember(db: Database, params: { workspaceId: string; userId: string; actorUserId: string }) {
  return db.transaction(async (tx) => {
    const admins = await lockAdmins(tx, params.workspaceId);
    const [current] = await tx.select().from(memberships).where(and(eq(memberships.workspaceId, params.workspaceId), eq(memberships.userId, params.userId)));
    if (!current) return null;
    if (current.role === "admin" && admins.length === 1) throw new MembershipError("This is the workspace's only admin; make someone else admin first.", "userId");
    await tx.delete(memberships).where(and(eq(memberships.workspaceId, params.workspaceId), eq(memberships.userId, params.userId)));
    await endSessionsIfNoWorkspace(tx, params.userId);
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.actorUserId, action: "member.removed", subjectType: "user", subjectId: params.userId, detail: { role: current.role } });
    return current;
  });
}
