// notify: e-mail the submitter that a run or sweep finished or failed, or about a review decision.
import type { Payload } from "../../lib/jobs/contracts";
import { appUrl, mailConfig } from "../../lib/config";
import { sendMail } from "../../lib/mail/transport";
import { workNoticeMail } from "../../lib/mail/run-messages";
import { findLatestDecider, findNoticeRecipient, findRunForNotice } from "../../db/queries/run-work";
import { findSweepForNotice } from "../../db/queries/sweep-work";
import type { SweepSummary } from "../../lib/sweeps";
import type { WorkerContext } from "../context";

const percent = (x: number) => `${Number((x * 100).toPrecision(3))}%`;

/** One line on a finished run: the headline estimate. */
function runOutcome(result: Record<string, unknown> | null, partial: boolean): string | undefined {
  const r = result as { replications: number; confidence: number; callCongestion: { estimate: number; ciLow: number; ciHigh: number } } | null;
  if (!r?.callCongestion) return undefined;
  const c = r.callCongestion;
  return `${partial ? "Partial result: c" : "C"}all congestion ${percent(c.estimate)} (${Math.round(r.confidence * 100)}% interval ${percent(c.ciLow)} to ${percent(c.ciHigh)}) from ${r.replications} replications.`;
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

export async function notify(ctx: WorkerContext, { subject, id, event }: Payload<"notify">): Promise<void> {
  const item = subject === "run" ? await findRunForNotice(ctx.db, id) : await findSweepForNotice(ctx.db, id);
  if (!item) return;
  const recipient = await findNoticeRecipient(ctx.db, item.submittedBy);
  if (!recipient) return; // no submitter left, or they turned notices off
  if (!mailConfig.smtpUrl()) {
    ctx.log(`notify: SMTP_URL is not set; not telling ${recipient.email} that ${subject} ${id} ${event}`);
    return;
  }
  const review = event === "approved" || event === "changes-requested";
  const detail = review ? undefined : event === "failed" ? `The error: ${item.error ?? "no reason was recorded"}` : subject === "run" ? runOutcome(item.result, "partial" in item && item.partial) : sweepOutcome(item.result);
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
    }),
  );
}
