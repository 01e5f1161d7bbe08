// notify: e-mail the submitter that a run or sweep finished, failed or was cancelled by someone else, or
// about a review decision.
import type { Payload } from "../../lib/jobs/contracts";
import { appUrl, mailConfig } from "../../lib/config";
import { sendMail } from "../../lib/mail/transport";
import { keptAfterCancel, workNoticeMail } from "../../lib/mail/run-messages";
import { findCancellation, findLatestDecider, findNoticeRecipient, findRunForNotice } from "../../db/queries/run-work";
import { countFinishedPoints, findSweepForNotice } from "../../db/queries/sweep-work";
import type { SweepSummary } from "../../lib/sweeps";
import type { WorkerContext } from "../context";

const percent = (x: number) => `${Number((x * 100).toPrecision(3))}%`;

type HeadlineResult = { replications: number; confidence: number; callCongestion: { estimate: number; ciLow: number; ciHigh: number } } | null;

/** The headline estimate with its interval, e.g. "1.2% (95% interval 1.1% to 1.3%)". */
function headlineEstimate(result: Record<string, unknown> | null): string | undefined {
  const r = result as HeadlineResult;
  if (!r?.callCongestion) return undefined;
  const c = r.callCongestion;
  return `${percent(c.estimate)} (${Math.round(r.confidence * 100)}% interval ${percent(c.ciLow)} to ${percent(c.ciHigh)})`;
}

/** One line on a finished run: the headline estimate. */
function runOutcome(result: Record<string, unknown> | null, partial: boolean): string | undefined {
  const estimate = headlineEstimate(result);
  if (!estimate) return undefined;
  return `${partial ? "Partial result: c" : "C"}all congestion ${estimate} from ${(result as NonNullable<HeadlineResult>).replications} replications.`;
}

/** One line on a finished sweep: the dimensioning answer, the grid's verdict counts, or the point count. */
function sweepOutcome(result: Record<string, unknown> | null): string | undefined {
  const s = result as SweepSummary | null;
  if (!s) return undefined;
  switch (s.kind) {
    case "dimensioning":
      return s.simulated
        ? `${s.formula.method} sizes the group at ${s.formula.servers} servers; the simulation needs ${s.simulated.servers} to meet ${percent(s.targetBlocking)} on the upper confidence bound.`
        : `No answer: ${s.unresolved ?? "the search did not finish"}.`;
    case "grid":
      return `The formula's sizing holds in ${s.counts.holds}, breaks in ${s.counts.breaks} and is inconclusive in ${s.counts.inconclusive} of ${s.cells.length} cells.`;
    case "sweep":
      return `${s.points.length} points over ${s.parameter}.`;
  }
}

/** The cancel notice's line on what was kept: replications and the headline estimate, or the finished points. */
async function keptLine(ctx: WorkerContext, item: NonNullable<Awaited<ReturnType<typeof findRunForNotice>> | Awaited<ReturnType<typeof findSweepForNotice>>>): Promise<string> {
  if ("replicationsDone" in item) {
    return keptAfterCancel({ subject: "run", replicationsDone: item.replicationsDone, replicationsPlanned: item.replicationsPlanned, estimate: headlineEstimate(item.result) });
  }
  const points = await countFinishedPoints(ctx.db, item.id);
  const summary = item.result as SweepSummary | null;
  // A plain sweep's summary line only counts its points, which the kept line already does.
  const outcome = summary && summary.kind !== "sweep" ? sweepOutcome(item.result) : undefined;
  return keptAfterCancel({ subject: "sweep", pointsDone: points.finished, pointsPlanned: Math.max(item.pointsPlanned, points.total), started: points.total > 0, outcome });
}

export async function notify(ctx: WorkerContext, { subject, id, event }: Payload<"notify">): Promise<void> {
  const item = subject === "run" ? await findRunForNotice(ctx.db, id) : await findSweepForNotice(ctx.db, id);
  if (!item) return;
  // A cancel is told only when someone other than the submitter did it (the audit event names who; with no
  // cancel recorded, as when a test sets the status directly, there is no one to name and nothing is sent).
  const cancellation = event === "cancelled" ? await findCancellation(ctx.db, subject, id) : undefined;
  if (cancellation === null || (cancellation && cancellation.userId === item.submittedBy)) return;
  const recipient = await findNoticeRecipient(ctx.db, item.submittedBy);
  if (!recipient) return; // no submitter left, or they turned notices off
  if (!mailConfig.smtpUrl()) {
    ctx.log(`notify: SMTP_URL is not set; not telling ${recipient.email} that ${subject} ${id} ${event}`);
    return;
  }
  const review = event === "approved" || event === "changes-requested";
  const detail = review
    ? undefined
    : event === "failed"
      ? `The error: ${item.error ?? "no reason was recorded"}`
      : event === "cancelled"
        ? await keptLine(ctx, item)
        : subject === "run"
          ? runOutcome(item.result, "partial" in item && item.partial)
          : sweepOutcome(item.result);
  const title = item.name || ("scenarioName" in item ? (item.scenarioName ?? "") : "");
  await sendMail(
    workNoticeMail({
      to: recipient.email,
      subject,
      event,
      url: `${appUrl()}/w/${item.workspaceSlug}/${subject === "run" ? "runs" : "sweeps"}/${id}`,
      workspaceId: item.workspaceId,
      workspaceName: item.workspaceName,
      title,
      detail,
      reviewer: review ? ((await findLatestDecider(ctx.db, subject, id)) ?? undefined) : undefined,
      cancelledBy: cancellation ? (cancellation.name ?? undefined) : undefined,
      cancelledAt: cancellation?.at,
    }),
  );
}
