import { desc } from "drizzle-orm";
import type { Database } from "../client";
import { capturedMail } from "../schema";

export async function listCapturedMail(db: Database, limit = 100) {
  return db.select().from(capturedMail).orderBy(desc(capturedMail.receivedAt), desc(capturedMail.id)).limit(limit);
}
