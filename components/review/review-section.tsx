import "server-only";
import { getDatabase } from "@/db/client";
import { findReviewSubject, listReviewComments } from "@/db/queries/reviews";
import { roleAllows } from "@/lib/auth/roles";
import type { WorkspaceAccess } from "@/lib/auth/guard";
import { ReviewPanel } from "./review-panel";

/** The review panel with its comments read on the server (the page refreshes after each comment). */
export async function ReviewSection({ access, subjectType, subjectId }: { access: WorkspaceAccess; subjectType: "run" | "sweep"; subjectId: string }) {
  const db = getDatabase();
  const subject = await findReviewSubject(db, access.workspace.id, subjectType, subjectId);
  if (!subject) return null;
  const comments = await listReviewComments(db, access.workspace.id, subjectType, subjectId);
  const finished = subject.status === "succeeded" || subject.status === "cancelled";
  return (
    <ReviewPanel
      workspace={access.workspace.slug}
      subjectType={subjectType}
      subjectId={subjectId}
      status={subject.reviewStatus}
      finished={finished}
      canComment={roleAllows(access.role, "review.comment")}
      canDecide={roleAllows(access.role, "review.decide")}
      comments={comments.map((c) => ({ id: c.id, body: c.body, decision: c.decision, createdAt: c.createdAt.toISOString(), author: c.author?.name ?? c.author?.email ?? "A former member" }))}
    />
  );
}
