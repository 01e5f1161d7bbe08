import { and, desc, eq, ne, or, sql } from "drizzle-orm";
import type { Database } from "../client";
import { capturedMail, memberships, users } from "../schema";

/**
 * A workspace's development mailbox: only messages sent about this workspace (tagged by the sender), addressed
 * to its current members or, for its own invitations, to the invitee. Never sign-in links: those sign a person
 * in, and an admin must not be able to read anyone's.
 */
export async function listWorkspaceMail(db: Database, workspaceId: string, limit = 100) {
  const toMember = sql`exists (
    select 1 from ${memberships} join ${users} on ${users.id} = ${memberships.userId}
    where ${memberships.workspaceId} = ${workspaceId} and lower(${users.email}) = any(${capturedMail.envelopeTo}))`;
  return db
    .select()
    .from(capturedMail)
    .where(and(eq(capturedMail.workspaceId, workspaceId), ne(capturedMail.kind, "sign-in-link"), or(eq(capturedMail.kind, "invitation"), toMember)))
    .orderBy(desc(capturedMail.receivedAt), desc(capturedMail.id))
    .limit(limit);
}
