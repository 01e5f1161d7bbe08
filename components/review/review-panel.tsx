"use client";

import { useRouter } from "next/navigation";
import { useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { Button, Card, CardBody, CardDescription, CardHeader, CardTitle, Field, FormError, Textarea, toast } from "@/components/ui";
import { ReviewBadge } from "@/components/runs/status";
import { formatDateTime } from "@/lib/client/format";
import { queryKeys } from "@/lib/client/queries/keys";
import type { ReviewStatus } from "@/lib/jobs/api-types";
import { submitReview } from "@/app/w/[workspace]/reviews/actions";

export interface ReviewEntry {
  id: string;
  body: string;
  decision: ReviewStatus | null;
  createdAt: string;
  author: string;
}

const decisionText: Record<string, string> = { approved: "approved", "changes-requested": "requested changes" };

export function ReviewPanel({
  workspace,
  subjectType,
  subjectId,
  status,
  finished,
  comments,
  canComment,
  canDecide,
}: {
  workspace: string;
  subjectType: "run" | "sweep";
  subjectId: string;
  status: ReviewStatus;
  finished: boolean;
  comments: ReviewEntry[];
  canComment: boolean;
  canDecide: boolean;
}) {
  const router = useRouter();
  const client = useQueryClient();
  const [body, setBody] = useState("");
  const [pending, setPending] = useState<string | null>(null);
  const [error, setError] = useState<{ message: string; field?: string } | null>(null);
  // Comments saved from this panel, shown until the page's own list (refreshed from the server) has them: the
  // panel must not depend on when, or whether, the refresh arrives.
  const [saved, setSaved] = useState<ReviewEntry[]>([]);
  const shown = [...comments, ...saved.filter((entry) => !comments.some((c) => c.id === entry.id))];
  const lastSavedDecision = saved.filter((entry) => entry.decision && !comments.some((c) => c.id === entry.id)).at(-1)?.decision;
  const shownStatus = lastSavedDecision ?? status;
  const send = async (decision?: "approved" | "changes-requested") => {
    setPending(decision ?? "comment");
    setError(null);
    const result = await submitReview(workspace, { subjectType, subjectId, body, ...(decision ? { decision } : {}) });
    setPending(null);
    if (!result.ok) {
      setError({ message: result.message, field: result.fields?.body });
      return;
    }
    toast.success(result.message ?? "Saved.");
    setBody("");
    if (result.data) setSaved((list) => [...list, result.data!.entry]);
    client.invalidateQueries({ queryKey: queryKeys.workspace(workspace) });
    router.refresh();
  };
  return (
    <Card aria-labelledby="review-title">
      <CardHeader actions={<ReviewBadge status={shownStatus} />}>
        <CardTitle as="h2">
          <span id="review-title">Review</span>
        </CardTitle>
        <CardDescription>Comments and decisions on this {subjectType}; every decision is in the audit log with who and when.</CardDescription>
      </CardHeader>
      <CardBody className="flex flex-col gap-4">
        {shown.length === 0 ? (
          <p className="text-sm text-basin-700">No comments yet.</p>
        ) : (
          <ol className="flex flex-col gap-3" aria-label="Review comments" data-testid="review-comments">
            {shown.map((c) => (
              <li key={c.id} className="rounded-md border border-basin-200 p-3 text-sm">
                <p className="text-xs text-basin-600">
                  <strong className="text-basin-900">{c.author}</strong>
                  {c.decision && c.decision !== "unreviewed" ? ` ${decisionText[c.decision]}` : " commented"} · {formatDateTime(c.createdAt)}
                </p>
                {c.body && <p className="mt-1 whitespace-pre-wrap text-basin-950">{c.body}</p>}
              </li>
            ))}
          </ol>
        )}
        {canComment && (
          <div className="flex flex-col gap-3">
            {error && !error.field && <FormError>{error.message}</FormError>}
            <Field label="Comment" hint={canDecide ? "Optional when approving; required when requesting changes." : undefined} error={error?.field}>
              <Textarea rows={3} value={body} onChange={(e) => setBody(e.target.value)} />
            </Field>
            <div className="flex flex-wrap gap-2">
              <Button variant="secondary" onClick={() => send()} pending={pending === "comment"} disabled={!!pending}>
                Add comment
              </Button>
              {canDecide && finished && (
                <>
                  <Button onClick={() => send("approved")} pending={pending === "approved"} disabled={!!pending}>
                    Approve
                  </Button>
                  <Button variant="danger" onClick={() => send("changes-requested")} pending={pending === "changes-requested"} disabled={!!pending}>
                    Request changes
                  </Button>
                </>
              )}
            </div>
          </div>
        )}
      </CardBody>
    </Card>
  );
}
