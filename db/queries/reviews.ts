import { and, asc, eq } from "drizzle-orm";
import type { Database } from "../client";
import { reviewComments, runs, sweeps, users, type reviewStatuses } from "../schema";
import { recordAudit } from "./audit";
import { RecordInputError } from "./errors";
import type { ReviewInput } from "@/lib/schemas/review";

type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];
type ReviewStatus = (typeof reviewStatuses)[number];

const subjects = { run: runs, sweep: sweeps } as const;

export interface ReviewComment {
  id: string;
  body: string;
  decision: ReviewStatus | null;
  createdAt: Date;
  author: { id: string; name: string | null; email: string } | null;
}

/** Comments and decisions on a run or sweep, oldest first. */
export async function listReviewComments(db: Database, workspaceId: string, subjectType: "run" | "sweep", subjectId: string): Promise<ReviewComment[]> {
  const rows = await db
    .select({ id: reviewComments.id, body: reviewComments.body, decision: reviewComments.decision, createdAt: reviewComments.createdAt, authorId: users.id, name: users.name, email: users.email })
    .from(reviewComments)
    .leftJoin(users, eq(users.id, reviewComments.authorId))
    .where(and(eq(reviewComments.workspaceId, workspaceId), eq(reviewComments.subjectType, subjectType), eq(reviewComments.subjectId, subjectId)))
    .orderBy(asc(reviewComments.createdAt));
  return rows.map(({ authorId, name, email, ...r }) => ({ ...r, author: authorId && email ? { id: authorId, name, email } : null }));
}

/** The subject's job status, review status and submitter, or null when it is not in this workspace. */
export async function findReviewSubject(db: Pick<Database, "select">, workspaceId: string, subjectType: "run" | "sweep", subjectId: string, options: { lock?: boolean } = {}) {
  const table = subjects[subjectType];
  const query = db
    .select({ id: table.id, status: table.status, reviewStatus: table.reviewStatus, submittedBy: table.submittedBy })
    .from(table)
    .where(and(eq(table.workspaceId, workspaceId), eq(table.id, subjectId)));
  const [row] = await (options.lock ? query.for("update") : query);
  return row ?? null;
}

export interface ReviewRecord extends ReviewInput {
  workspaceId: string;
  authorId: string;
}

/**
 * A comment, and with a decision the subject's new review status, one audit event, and (through `notify`, in the
 * same transaction) the submitter's e-mail job: all commit together or not at all. Only finished work is decided on.
 */
export async function recordReview(db: Database, input: ReviewRecord, notify: (tx: Transaction, event: ReviewStatus) => Promise<unknown>) {
  return db.transaction(async (tx) => {
    const subject = await findReviewSubject(tx, input.workspaceId, input.subjectType, input.subjectId, { lock: true });
    if (!subject) throw new RecordInputError(`No ${input.subjectType} ${input.subjectId} in this workspace.`, "subjectId");
    if (input.decision && subject.status !== "succeeded" && subject.status !== "cancelled")
      throw new RecordInputError(`Only finished work can be approved or sent back; this ${input.subjectType} is ${subject.status}.`, "decision");
    const [comment] = await tx
      .insert(reviewComments)
      .values({ workspaceId: input.workspaceId, subjectType: input.subjectType, subjectId: input.subjectId, authorId: input.authorId, body: input.body, decision: input.decision ?? null })
      .returning({ id: reviewComments.id, createdAt: reviewComments.createdAt });
    if (input.decision) {
      const table = subjects[input.subjectType];
      await tx.update(table).set({ reviewStatus: input.decision }).where(eq(table.id, input.subjectId));
    }
    await recordAudit(tx, {
      workspaceId: input.workspaceId,
      actorUserId: input.authorId,
      action: input.decision ? `review.${input.decision}` : "review.commented",
      subjectType: input.subjectType,
      subjectId: input.subjectId,
      detail: { commentId: comment.id, ...(input.decision ? { from: subject.reviewStatus, to: input.decision } : {}) },
    });
    if (input.decision && subject.submittedBy) await notify(tx, input.decision);
    return { commentId: comment.id, createdAt: comment.createdAt };
  });
}
