import { and, eq, gt, sql } from "drizzle-orm";
import type { Database } from "../client";
import { signInAttempts, users } from "../schema";

export async function findUserByEmail(db: Database, email: string) {
  const [user] = await db.select().from(users).where(sql`lower(${users.email}) = ${email.toLowerCase()}`);
  return user ?? null;
}

export async function findUserById(db: Database, id: string) {
  const [user] = await db.select().from(users).where(eq(users.id, id));
  return user ?? null;
}

export async function recordSignInAttempt(db: Database, email: string, succeeded: boolean) {
  await db.insert(signInAttempts).values({ email: email.toLowerCase(), succeeded });
}

/** Failed password attempts for this address since `since`, ignoring those before the last success. */
export async function countRecentFailedSignIns(db: Database, email: string, since: Date): Promise<number> {
  const normalized = email.toLowerCase();
  const [lastSuccess] = await db
    .select({ at: sql<Date | null>`max(${signInAttempts.createdAt})` })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, normalized), eq(signInAttempts.succeeded, true)));
  const from = lastSuccess?.at && new Date(lastSuccess.at) > since ? new Date(lastSuccess.at) : since;
  const [row] = await db
    .select({ count: sql<number>`count(*)::int` })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, normalized), eq(signInAttempts.succeeded, false), gt(signInAttempts.createdAt, from)));
  return row?.count ?? 0;
}
