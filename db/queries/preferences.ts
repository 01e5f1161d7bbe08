import { eq, sql } from "drizzle-orm";
import type { Database } from "../client";
import { userPreferences } from "../schema";
import type { Preferences } from "@/lib/jobs/api-types";

/** The user's settings; a user who never saved any gets the defaults (notices on). */
export async function findPreferences(db: Database, userId: string): Promise<Preferences> {
  const [row] = await db.select({ notifyByEmail: userPreferences.notifyByEmail }).from(userPreferences).where(eq(userPreferences.userId, userId));
  return { notifyByEmail: row?.notifyByEmail ?? true };
}

/** Saves the user's settings (insert or update) and returns them as stored. */
export async function savePreferences(db: Database, userId: string, preferences: Preferences): Promise<Preferences> {
  const [row] = await db
    .insert(userPreferences)
    .values({ userId, notifyByEmail: preferences.notifyByEmail })
    .onConflictDoUpdate({ target: userPreferences.userId, set: { notifyByEmail: preferences.notifyByEmail, updatedAt: sql`now()` } })
    .returning({ notifyByEmail: userPreferences.notifyByEmail });
  return { notifyByEmail: row.notifyByEmail };
}
