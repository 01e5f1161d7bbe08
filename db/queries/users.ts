import { and, eq, gt, lt, sql } from "drizzle-orm";
import type { Database } from "../client";
import { memberships, sessions, signInAttempts, users, verificationTokens } from "../schema";
import { signInLimits } from "@/lib/schemas/sign-in-limits";

export async function findUserByEmail(db: Database, email: string) {
  const [user] = await db.select().from(users).where(sql`lower(${users.email}) = ${email.toLowerCase()}`);
  return user ?? null;
}

export async function findUserById(db: Database, id: string) {
  const [user] = await db.select().from(users).where(eq(users.id, id));
  return user ?? null;
}

export type SignInRefusal = "address-and-client" | "client" | "address";

/**
 * Checks the failed-attempt limits and records this attempt as failed in one step, under per-address and
 * per-client locks, so parallel attempts cannot all pass the check before any is recorded. The caller marks
 * the attempt succeeded once the password matched (`markSignInSucceeded`).
 *
 * Policy (see lib/schemas/sign-in-limits.ts): a client that failed too often for an address, or too often
 * overall, is refused; an address attacked from many clients is refused only to clients that have failed for
 * it, so a correct password from a client that has not failed still signs in.
 */
export async function beginSignInAttempt(
  db: Database,
  params: { email: string; client: string; now?: Date },
): Promise<{ allowed: true; attemptId: number } | { allowed: false; reason: SignInRefusal }> {
  const email = params.email.toLowerCase();
  const now = params.now ?? new Date();
  const since = new Date(now.getTime() - signInLimits.windowMinutes * 60_000);
  return db.transaction(async (tx) => {
    // Fixed lock order (address, then client) so two attempts never wait on each other crosswise.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`sign-in:address:${email}`}))`);
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`sign-in:client:${params.client}`}))`);
    const [lastSuccess] = await tx
      .select({ at: sql<string | null>`max(${signInAttempts.createdAt})` })
      .from(signInAttempts)
      .where(and(eq(signInAttempts.email, email), eq(signInAttempts.succeeded, true)));
    const from = lastSuccess?.at && new Date(lastSuccess.at) > since ? new Date(lastSuccess.at) : since;
    const [counts] = await tx
      .select({
        address: sql<number>`count(*) filter (where ${signInAttempts.email} = ${email} and ${signInAttempts.createdAt} > ${from})::int`,
        addressAndClient: sql<number>`count(*) filter (where ${signInAttempts.email} = ${email} and ${signInAttempts.client} = ${params.client} and ${signInAttempts.createdAt} > ${from})::int`,
        client: sql<number>`count(*) filter (where ${signInAttempts.client} = ${params.client})::int`,
      })
      .from(signInAttempts)
      .where(and(eq(signInAttempts.succeeded, false), gt(signInAttempts.createdAt, since), sql`(${signInAttempts.email} = ${email} or ${signInAttempts.client} = ${params.client})`));
    const reason = signInRefusal(counts ?? { address: 0, addressAndClient: 0, client: 0 });
    if (reason) return { allowed: false as const, reason };
    const [row] = await tx.insert(signInAttempts).values({ email, client: params.client, succeeded: false, createdAt: now }).returning({ id: signInAttempts.id });
    return { allowed: true as const, attemptId: row.id };
  });
}

function signInRefusal(failures: { address: number; addressAndClient: number; client: number }): SignInRefusal | null {
  if (failures.addressAndClient >= signInLimits.perAddressAndClient) return "address-and-client";
  if (failures.client >= signInLimits.perClient) return "client";
  if (failures.address >= signInLimits.perAddress && failures.addressAndClient > 0) return "address";
  return null;
}

export async function markSignInSucceeded(db: Database, attemptId: number) {
  await db.update(signInAttempts).set({ succeeded: true }).where(eq(signInAttempts.id, attemptId));
}

/** Sign-in links requested for this address within the window (each leaves a verification token). */
export async function countRecentSignInLinks(db: Database, email: string, now = new Date()): Promise<number> {
  // Tokens expire a fixed time after they are made, so "made within the window" is "expires after now + maxAge − window".
  const after = new Date(now.getTime() + (signInLimits.linkMaxAgeHours * 60 - signInLimits.windowMinutes) * 60_000);
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(verificationTokens)
    .where(and(eq(verificationTokens.identifier, email.toLowerCase()), gt(verificationTokens.expires, after)));
  return row?.n ?? 0;
}

// Browser sessions: the signed cookie names a row here, so signing out (or losing the last workspace) ends it
// on the server too, not only in the browser that held the cookie.

export async function createSession(db: Database, params: { userId: string; sessionId: string; expires: Date }) {
  await db.insert(sessions).values({ sessionToken: params.sessionId, userId: params.userId, expires: params.expires });
}

export async function isSessionActive(db: Database, params: { userId: string; sessionId: string; now?: Date }): Promise<boolean> {
  const [row] = await db
    .select({ id: sessions.sessionToken })
    .from(sessions)
    .where(and(eq(sessions.sessionToken, params.sessionId), eq(sessions.userId, params.userId), gt(sessions.expires, params.now ?? new Date())));
  return !!row;
}

export async function endSession(db: Pick<Database, "delete">, sessionId: string) {
  await db.delete(sessions).where(eq(sessions.sessionToken, sessionId));
}

/** Ends every session of a user who no longer belongs to any workspace (pass the transaction that removed them). */
export async function endSessionsIfNoWorkspace(db: Pick<Database, "delete" | "select">, userId: string) {
  const [remaining] = await db.select({ userId: memberships.userId }).from(memberships).where(eq(memberships.userId, userId)).limit(1);
  if (!remaining) await db.delete(sessions).where(eq(sessions.userId, userId));
}

/** Housekeeping: expired session rows. */
export async function deleteExpiredSessions(db: Database, now = new Date()) {
  await db.delete(sessions).where(lt(sessions.expires, now));
}
