import { Badge, type BadgeTone } from "@/components/ui";
import type { JobStatus, ReviewStatus } from "@/lib/jobs/api-types";

const jobTones: Record<JobStatus, { tone: BadgeTone; label: string }> = {
  queued: { tone: "neutral", label: "Queued" },
  running: { tone: "info", label: "Running" },
  succeeded: { tone: "success", label: "Finished" },
  failed: { tone: "danger", label: "Failed" },
  cancelled: { tone: "warning", label: "Cancelled" },
};

export function JobStatusBadge({ status, partial }: { status: JobStatus; partial?: boolean }) {
  const t = jobTones[status] ?? jobTones.queued;
  return (
    <Badge tone={t.tone} data-testid="job-status">
      {t.label}
      {partial ? " (partial result)" : ""}
    </Badge>
  );
}

const reviewTones: Record<ReviewStatus, { tone: BadgeTone; label: string }> = {
  unreviewed: { tone: "neutral", label: "Not reviewed" },
  approved: { tone: "success", label: "Approved" },
  "changes-requested": { tone: "warning", label: "Changes requested" },
};

export function ReviewBadge({ status }: { status: ReviewStatus }) {
  const t = reviewTones[status] ?? reviewTones.unreviewed;
  return (
    <Badge tone={t.tone} data-testid="review-status">
      {t.label}
    </Badge>
  );
}

/** A labelled progress bar (role=progressbar) that keeps its height whether or not the figure is known. */
export function ProgressBar({ fraction, label, detail }: { fraction: number; label: string; detail?: string }) {
  const pct = Math.max(0, Math.min(100, Math.round(fraction * 100)));
  return (
    <div className="flex flex-col gap-1">
      <div className="flex justify-between text-xs text-basin-700">
        <span>{label}</span>
        <span className="tabular-nums">{detail ?? `${pct} %`}</span>
      </div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} className="h-2 w-full overflow-hidden rounded-full bg-basin-100">
        <div className="h-full rounded-full bg-basin-600 transition-[width] duration-500" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}
