import { desc, eq } from "drizzle-orm";
import type { Database } from "../client";
import { auditEvents, users } from "../schema";

type Executor = Pick<Database, "insert">;

export interface AuditEntry {
  workspaceId: string | null;
  actorUserId: string | null;
  action: string;
  subjectType?: string;
  subjectId?: string;
  detail?: Record<string, unknown>;
}

/** Pass the transaction so the audit row commits or rolls back with the change it records. */
export async function recordAudit(executor: Executor, entry: AuditEntry) {
  await executor.insert(auditEvents).values({ ...entry, detail: entry.detail ?? {} });
}

export async function listAuditEvents(db: Database, workspaceId: string, limit = 200) {
  return db
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      subjectType: auditEvents.subjectType,
      subjectId: auditEvents.subjectId,
      detail: auditEvents.detail,
      createdAt: auditEvents.createdAt,
      actorEmail: users.email,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorUserId))
    .where(eq(auditEvents.workspaceId, workspaceId))
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(limit);
}
