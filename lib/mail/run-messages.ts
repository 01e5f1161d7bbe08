// Texts of the notices about background work: a run or sweep finished or failed, a review decision.
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
}

const what = { run: "run", sweep: "sweep" } as const;

const headline: Record<WorkEvent, (n: WorkNotice, name: string) => { subject: string; intro: string; button: string }> = {
  succeeded: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}finished`, intro: `Your ${what[n.subject]} ${name}in "${n.workspaceName}" has finished.`, button: "Open the results" }),
  failed: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}failed`, intro: `Your ${what[n.subject]} ${name}in "${n.workspaceName}" stopped with an error.`, button: `Open the ${what[n.subject]}` }),
  cancelled: (n, name) => ({ subject: `Your ${what[n.subject]} ${name}was cancelled`, intro: `Your ${what[n.subject]} ${name}in "${n.workspaceName}" was cancelled; what finished before is kept as a partial result.`, button: `Open the ${what[n.subject]}` }),
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
