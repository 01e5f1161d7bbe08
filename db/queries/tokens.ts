import { and, desc, eq, isNull, lt, or } from "drizzle-orm";
import type { Database } from "../client";
import { apiTokens, memberships, workspaces } from "../schema";
import { recordAudit } from "./audit";
import { hashToken, newSecretToken } from "@/lib/secrets/tokens";

/** Prefix of every API token, so a leaked one is recognisable. */
export const apiTokenPrefix = "spw_";

/** Creates a token for the user in the workspace; the secret is returned once and stored only hashed. */
export async function createApiToken(db: Database, params: { workspaceId: string; userId: string; name: string }) {
  const token = newSecretToken(apiTokenPrefix);
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(apiTokens)
      .values({ workspaceId: params.workspaceId, userId: params.userId, name: params.name, tokenHash: hashToken(token) })
      .returning({ id: apiTokens.id, name: apiTokens.name, createdAt: apiTokens.createdAt });
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.userId, action: "token.created", subjectType: "api-token", subjectId: row.id, detail: { name: params.name } });
    return { ...row, token };
  });
}

/** The user's tokens in the workspace, newest first, never the secret. */
export async function listApiTokens(db: Database, params: { workspaceId: string; userId: string }) {
  return db
    .select({ id: apiTokens.id, name: apiTokens.name, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .where(and(eq(apiTokens.workspaceId, params.workspaceId), eq(apiTokens.userId, params.userId)))
    .orderBy(desc(apiTokens.createdAt));
}

/**
 * Revokes a token of this workspace: the caller's own, or anyone's when `anyOwner` (admins). Null when there is
 * no such open token, so other workspaces' ids look missing.
 */
export async function revokeApiToken(db: Database, params: { workspaceId: string; tokenId: string; actorUserId: string; anyOwner: boolean }) {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .update(apiTokens)
      .set({ revokedAt: new Date() })
      .where(
        and(
          eq(apiTokens.workspaceId, params.workspaceId),
          eq(apiTokens.id, params.tokenId),
          isNull(apiTokens.revokedAt),
          params.anyOwner ? undefined : eq(apiTokens.userId, params.actorUserId),
        ),
      )
      .returning({ id: apiTokens.id, name: apiTokens.name, userId: apiTokens.userId });
    if (!row) return null;
    await recordAudit(tx, { workspaceId: params.workspaceId, actorUserId: params.actorUserId, action: "token.revoked", subjectType: "api-token", subjectId: row.id, detail: { name: row.name, owner: row.userId } });
    return row;
  });
}

/**
 * Who a presented token acts for: its owner, in its workspace, with the owner's current role. Null for an
 * unknown or revoked token and when the owner is no longer a member there.
 */
export async function findApiTokenGrant(db: Database, token: string, now = new Date()) {
  const [row] = await db
    .select({ tokenId: apiTokens.id, userId: apiTokens.userId, workspace: workspaces, role: memberships.role, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .innerJoin(workspaces, eq(workspaces.id, apiTokens.workspaceId))
    .innerJoin(memberships, and(eq(memberships.workspaceId, apiTokens.workspaceId), eq(memberships.userId, apiTokens.userId)))
    .where(and(eq(apiTokens.tokenHash, hashToken(token)), isNull(apiTokens.revokedAt)));
  if (!row) return null;
  // Last use to the minute is enough, and keeps busy scripts from writing on every request.
  const stale = new Date(now.getTime() - 60_000);
  if (!row.lastUsedAt || row.lastUsedAt < stale) {
    await db
      .update(apiTokens)
      .set({ lastUsedAt: now })
      .where(and(eq(apiTokens.id, row.tokenId), or(isNull(apiTokens.lastUsedAt), lt(apiTokens.lastUsedAt, stale))));
  }
  return { tokenId: row.tokenId, userId: row.userId, workspace: row.workspace, role: row.role };
}

export type ApiTokenGrant = NonNullable<Awaited<ReturnType<typeof findApiTokenGrant>>>;

