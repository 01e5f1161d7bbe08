"use server";

import { revalidatePath } from "next/cache";
import { getDatabase } from "@/db/client";
import { getBoss, jobsIn, sendJob } from "@/db/queue";
import { recordReview } from "@/db/queries/reviews";
import { guardedAction } from "@/lib/auth/guarded-action";
import { queues } from "@/lib/jobs/contracts";
import { reviewInputSchema } from "@/lib/schemas/review";
import type { ActionResult } from "@/lib/schemas/validation";
import type { ReviewEntry } from "@/components/review/review-panel";

/** Comment on a run or sweep; with a decision (reviewers only) the submitter is e-mailed through the notify queue. */
export async function submitReview(workspaceSlug: string, input: unknown): Promise<ActionResult<{ entry: ReviewEntry }>> {
  const decides = !!(input as { decision?: unknown } | null)?.decision;
  return guardedAction(workspaceSlug, decides ? "review.decide" : "review.comment", reviewInputSchema, input, async (access, value) => {
    const boss = value.decision ? await getBoss() : null;
    const done = await recordReview(getDatabase(), { ...value, workspaceId: access.workspace.id, authorId: access.user.id }, (tx, event) =>
      sendJob(boss!, queues.notify, { subject: value.subjectType, id: value.subjectId, event: event as "approved" | "changes-requested" }, { db: jobsIn(tx) }),
    );
    revalidatePath(`/w/${workspaceSlug}/${value.subjectType}s/${value.subjectId}`);
    const message = value.decision === "approved" ? "Approved; the submitter is told by e-mail." : value.decision ? "Changes requested; the submitter is told by e-mail." : "Comment added.";
    // The saved comment as the panel lists it, so the panel shows it at once whatever the page refresh does.
    const entry: ReviewEntry = { id: done.commentId, body: value.body, decision: value.decision ?? null, createdAt: done.createdAt.toISOString(), author: access.user.name ?? access.user.email };
    return { ok: true, data: { entry }, message };
  });
}
