// Password sign-in's decision, without next-auth, so it is tested against a real database.
import type { Database } from "@/db/client";
import { beginSignInAttempt, findUserByEmail, markSignInSucceeded } from "@/db/queries/users";
import { decoyPasswordHash, verifyPassword } from "@/lib/secrets/password";

export type CredentialsOutcome =
  | { ok: true; user: { id: string; email: string; name: string | null } }
  | { ok: false; reason: "too-many-attempts" | "invalid-credentials" };

/**
 * Checks and records the attempt under the sign-in limits, then the password. Unknown addresses and accounts
 * without a password are checked against a decoy hash of the same cost, so every wrong answer takes as long.
 */
export async function verifyCredentials(db: Database, params: { email: string; password: string; client: string }): Promise<CredentialsOutcome> {
  const attempt = await beginSignInAttempt(db, { email: params.email, client: params.client });
  if (!attempt.allowed) return { ok: false, reason: "too-many-attempts" };
  const user = await findUserByEmail(db, params.email);
  const matches = await verifyPassword(params.password, user?.passwordHash ?? (await decoyPasswordHash()));
  if (!matches || !user?.passwordHash) return { ok: false, reason: "invalid-credentials" };
  await markSignInSucceeded(db, attempt.attemptId);
  return { ok: true, user: { id: user.id, email: user.email, name: user.name } };
}
