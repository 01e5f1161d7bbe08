// Texts of the notices about background work: a run or sweep finished, failed or was cancelled by someone
// else, a review decision.
import { layout } from "./messages";
import type { OutgoingMail } from "./transport";

export type WorkSubject = "run" | "sweep";
export type WorkEvent = "succeeded" | "failed" | "cancelled" | "approved" | "changes-requested";

export interface WorkNotice {
  to: string;
  subject: WorkSubject;
  event: WorkEvent;
  /** `${APP_URL}/w/<slug>/runs/<id>` or `/sweeps/<id>`. */
  url: string;
  workspaceId: string;
  workspaceName: string;
  /** The run's or sweep's name, else its scenario's; may be empty. */
  title: string;
  /** One line on the outcome (e.g. the headline estimate) or the error text. */
  detail?: string;
  /** Who decided, for review decisions. */
  reviewer?: string;
  /** Who cancelled the work and when, for cancel notices. */
  cancelledBy?: string;
  cancelledAt?: Date;
}

const what = { run: "run", sweep: "sweep" } as const;

const headline: Record<WorkEvent, (n: WorkNotice, name: string) => { subject: string; intro: string; button: string }> = {
  succeeded: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}finished`, intro: `Your ${what[n.subject]} ${name}in "${n.workspaceName}" has finished.`, button: "Open the results" }),
  failed: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}failed`, intro: `Your ${what[n.subject]} ${name}in "${n.workspaceName}" stopped with an error.`, button: `Open the ${what[n.subject]}` }),
  cancelled: (n, name) => ({
    subject: `Your ${what[n.subject]} ${name}was cancelled${n.cancelledBy ? ` by ${n.cancelledBy}` : ""}`,
    intro: `${n.cancelledBy ?? "Someone"} cancelled your ${what[n.subject]} ${name}in "${n.workspaceName}"${n.cancelledAt ? ` on ${n.cancelledAt.toUTCString()}` : ""}.`,
    button: `Open the ${what[n.subject]}`,
  }),
  approved: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}was approved`, intro: `${n.reviewer ?? "A reviewer"} approved your ${what[n.subject]} ${name}in "${n.workspaceName}".`, button: "Open the review" }),
  "changes-requested": (n, name) => ({
    subject: `Changes requested on your ${what[n.subject]} ${name}`.trim(),
    intro: `${n.reviewer ?? "A reviewer"} asked for changes to your ${what[n.subject]} ${name}in "${n.workspaceName}".`,
    button: "Open the review",
  }),
};

export function workNoticeMail(n: WorkNotice): OutgoingMail {
  const name = n.title ? `"${n.title}" ` : "";
  const h = headline[n.event](n, name);
  const paragraphs = [h.intro, ...(n.detail ? [n.detail] : [])];
  const off = "You get these notices because you submitted this work; turn them off under your account settings.";
  return {
    to: n.to,
    kind: `${n.subject}-${n.event}`,
    workspaceId: n.workspaceId,
    subject: h.subject.trim(),
    text: `${paragraphs.join("\n\n")}\n\n${h.button}: ${n.url}\n\n${off}\n`,
    html: layout([...paragraphs, off], { href: n.url, label: h.button }),
  };
}

/** What a cancelled run or sweep kept. `estimate`: the headline call congestion with its interval; `outcome`: a summary line. */
export type KeptWork =
  | { subject: "run"; replicationsDone: number; replicationsPlanned: number; estimate?: string }
  | { subject: "sweep"; pointsDone: number; pointsPlanned: number; started: boolean; outcome?: string };

/** The cancel notice's line on what was kept. */
export function keptAfterCancel(k: KeptWork): string {
  if (k.subject === "run") {
    if (k.replicationsDone === 0) return "Nothing was kept: no replication had finished.";
    return `Kept as a partial result: ${k.replicationsDone} of ${k.replicationsPlanned} planned replications done${k.estimate ? `, call congestion ${k.estimate}` : ""}.`;
  }
  if (!k.started) return "Nothing was kept: the sweep had not started.";
  const outcome = k.outcome ? ` ${k.outcome}` : "";
  if (k.pointsDone === 0) return `No point had finished; points cut short keep their partial results.${outcome}`;
  return `Kept: ${k.pointsDone} of ${k.pointsPlanned} points had finished; points cut short keep their partial results.${outcome}`;
}
