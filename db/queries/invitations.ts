import { and, desc, eq, gt, isNull, sql } from "drizzle-orm";
import type { Database } from "../client";
import { invitations, memberships, users, workspaces } from "../schema";
import { recordAudit } from "./audit";
import { RecordInputError } from "./errors";
import type { WorkspaceRole } from "@/lib/schemas/roles";
import { invitationValidityDays } from "@/lib/schemas/invitation";
import { hashPassword } from "@/lib/secrets/password";
import { hashToken as hashInvitationToken, newSecretToken } from "@/lib/secrets/tokens";

export { hashInvitationToken };

export class InvitationError extends RecordInputError {
  constructor(message: string, field = "token") {
    super(message, field);
  }
}

export async function createInvitation(
  db: Database,
  params: { workspaceId: string; email: string; role: WorkspaceRole; invitedBy: string; now?: Date },
  /** Sends the link inside the transaction: if delivery fails, no invitation is left behind. */
  deliver: (token: string, invitation: typeof invitations.$inferSelect) => Promise<void>,
) {
  const token = newSecretToken();
  const now = params.now ?? new Date();
  const expiresAt = new Date(now.getTime() + invitationValidityDays * 86_400_000);
  return db.transaction(async (tx) => {
    const [existingMember] = await tx
      .select({ userId: memberships.userId })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, params.workspaceId), sql`lower(${users.email}) = ${params.email}`));
    if (existingMember) throw new InvitationError(`${params.email} is already a member of this workspace.`, "email");
    // A new invitation replaces any still-open one for the same address.
    await tx
      .update(invitations)
      .set({ revokedAt: now })
      .where(and(eq(invitations.workspaceId, params.workspaceId), eq(invitations.email, params.email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    const [invitation] = await tx
      .insert(invitations)
      .values({ workspaceId: params.workspaceId, email: params.email, role: params.role, tokenHash: hashInvitationToken(token), invitedBy: params.invitedBy, expiresAt })
      .returning();
    await recordAudit(tx, {
      workspaceId: params.workspaceId,
      actorUserId: params.invitedBy,
      action: "invitation.created",
      subjectType: "invitation",
      subjectId: invitation.id,
      detail: { email: params.email, role: params.role },
    });
    await deliver(token, invitation);
    return { invitation, token };
  });
}

export async function listOpenInvitations(db: Database, workspaceId: string, now = new Date()) {
  return db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, expiresAt: invitations.expiresAt, createdAt: invitations.createdAt })
    .from(invitations)
    .where(and(eq(invitations.workspaceId, workspaceId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)))
    .orderBy(desc(invitations.createdAt));
}

/** Scoped by workspace: an id from another workspace is simply not found. */
export async function findInvitationInWorkspace(db: Database, workspaceId: string, invitationId: string) {
  const [row] = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.workspaceId, workspaceId), eq(invitations.id, invitationId)));
  return row ?? null;
}

export async function revokeInvitation(db: Database, params: { workspaceId: string; invitationId: string; actorUserId: string }) {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.workspaceId, params.workspaceId), eq(invitations.id, params.invitationId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
      .returning();
    if (!row) return null;
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.actorUserId, action: "invitation.revoked", subjectType: "invitation", subjectId: row.id, detail: { email: row.email } });
    return row;
  });
}

/** The invitation a link points at, with its workspace, if it can still be accepted. */
export async function findOpenInvitationByToken(db: Database, token: string, now = new Date()) {
  const [row] = await db
    .select({ invitation: invitations, workspace: workspaces })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .where(eq(invitations.tokenHash, hashInvitationToken(token)));
  if (!row) return { status: "unknown" as const };
  if (row.invitation.acceptedAt) return { status: "accepted" as const, ...row };
  if (row.invitation.revokedAt) return { status: "revoked" as const, ...row };
  if (row.invitation.expiresAt <= now) return { status: "expired" as const, ...row };
  const [existingUser] = await db.select({ id: users.id, hasPassword: sql<boolean>`${users.passwordHash} is not null` }).from(users).where(sql`lower(${users.email}) = ${row.invitation.email}`);
  return { status: "open" as const, ...row, existingUser: existingUser ?? null };
}

/**
 * Accepts in one transaction: claims the invitation (single use), creates or updates the user,
 * adds the membership, records the audit event. Any failure leaves nothing half-written.
 */
export async function acceptInvitation(db: Database, params: { token: string; name?: string; password?: string; now?: Date }) {
  const now = params.now ?? new Date();
  const passwordHash = params.password ? await hashPassword(params.password) : null;
  return db.transaction(async (tx) => {
    const [claimed] = await tx
      .update(invitations)
      .set({ acceptedAt: now })
      .where(and(eq(invitations.tokenHash, hashInvitationToken(params.token)), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, now)))
      .returning();
    if (!claimed) throw new InvitationError("This invitation link is not valid any more: it was used, revoked or has expired. Ask an admin for a new one.");
    const [existing] = await tx.select().from(users).where(sql`lower(${users.email}) = ${claimed.email}`);
    let userId: string;
    if (existing) {
      userId = existing.id;
      if (!existing.passwordHash && passwordHash) {
        await tx.update(users).set({ passwordHash, name: existing.name ?? params.name ?? null, emailVerified: existing.emailVerified ?? now }).where(eq(users.id, existing.id));
      }
    } else {
      if (!passwordHash || !params.name) throw new InvitationError("Choose a name and a password to create your account.", "password");
      const [created] = await tx.insert(users).values({ email: claimed.email, name: params.name, passwordHash, emailVerified: now }).returning({ id: users.id });
      userId = created.id;
    }
    await tx
      .insert(memberships)
      .values({ userId, workspaceId: claimed.workspaceId, role: claimed.role })
      .onConflictDoUpdate({ target: [memberships.userId, memberships.workspaceId], set: { role: claimed.role } });
    await recordAudit(tx, { workspaceId: claimed.workspaceId, actorUserId: userId, action: "invitation.accepted", subjectType: "invitation", subjectId: claimed.id, detail: { email: claimed.email, role: claimed.role } });
    const [workspace] = await tx.select().from(workspaces).where(eq(workspaces.id, claimed.workspaceId));
    return { userId, email: claimed.email, workspace, role: claimed.role };
  });
}
