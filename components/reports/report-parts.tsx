// Building blocks of the printable run and sweep reports. Server components (no hooks): the client islands are
// LocalTime, PrintButton, the charts and the export links.
import type { ReactNode } from "react";
import Link from "next/link";
import { Badge, Callout, Card, CardBody, CardDescription, CardHeader, CardTitle, LinkButton, PageHeader, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { SafetyNote } from "@/components/lab/safety-note";
import { JobStatusBadge, ReviewBadge } from "@/components/runs/status";
import { ExportLinks } from "@/components/sweeps/sweep-view";
import type { ReviewEntry } from "@/components/review/review-panel";
import type { ReviewComment } from "@/db/queries/reviews";
import type { JobStatus, PersonRef, ReviewStatus } from "@/lib/jobs/api-types";
import type { Reference } from "@/lib/simulation";
import { LocalTime } from "./local-time";
import { PrintButton } from "./print-button";
import type { WordLine } from "./scenario-words";

/** A report section: a card that keeps its heading with its first lines on paper. */
export function ReportSection({ title, description, actions, children, testId, className }: { title: string; description?: ReactNode; actions?: ReactNode; children: ReactNode; testId?: string; className?: string }) {
  return (
    <Card className={`print:border-0 print:shadow-none ${className ?? ""}`} data-testid={testId}>
      <CardHeader actions={actions} className="break-after-avoid print:px-0">
        <CardTitle as="h2">{title}</CardTitle>
        {description && <CardDescription>{description}</CardDescription>}
      </CardHeader>
      <CardBody className="flex flex-col gap-4 print:px-0">{children}</CardBody>
    </Card>
  );
}

/** Labelled lines of words (the scenario, the sweep definition, the simulation's notes). */
export function WordList({ lines, label }: { lines: WordLine[]; label: string }) {
  return (
    <dl aria-label={label} className="grid gap-x-6 gap-y-2 sm:grid-cols-[minmax(10rem,14rem)_1fr]">
      {lines.map((line) => (
        <div key={line.label} className="contents">
          <dt className="font-medium text-basin-800">{line.label}</dt>
          <dd className="text-basin-950">{line.text}</dd>
        </div>
      ))}
    </dl>
  );
}

export interface ReportHeaderProps {
  kind: "Run" | "Sweep";
  title: string;
  workspace: string;
  subject: "runs" | "sweeps";
  id: string;
  status: JobStatus;
  partial?: boolean;
  reviewStatus: ReviewStatus;
  submittedBy: PersonRef | null;
  createdAt: string;
  finishedAt: string | null;
  scenario: { id: string | null; name: string | null; revision: number | null };
  exportable: boolean;
}

/** Title, what the report is about and when it was made; print and download links stay off paper. */
export function ReportHeader(p: ReportHeaderProps) {
  const back = `/w/${p.workspace}/${p.subject}/${p.id}`;
  return (
    <PageHeader
      eyebrow={`Report · ${p.kind}`}
      title={p.title}
      description={
        <span className="flex flex-col gap-1">
          <span className="flex flex-wrap items-center gap-2">
            <JobStatusBadge status={p.status} partial={p.partial} />
            <ReviewBadge status={p.reviewStatus} />
          </span>
          <span>
            {p.scenario.id ? (
              <>
                Scenario{" "}
                <Link href={`/w/${p.workspace}/scenarios/${p.scenario.id}`} className="font-medium text-basin-900 underline underline-offset-2">
                  {p.scenario.name ?? "(unnamed)"}
                </Link>
                {p.scenario.revision ? `, revision ${p.scenario.revision}` : ""}.{" "}
              </>
            ) : (
              "A scenario given inline (not stored in the workspace). "
            )}
            Submitted <LocalTime iso={p.createdAt} />
            {p.submittedBy ? ` by ${p.submittedBy.name ?? p.submittedBy.email}` : ""}
            {p.finishedAt ? (
              <>
                ; finished <LocalTime iso={p.finishedAt} />
              </>
            ) : null}
            .
          </span>
          <span>
            Report prepared <LocalTime iso={new Date().toISOString()} />.
          </span>
        </span>
      }
      actions={
        <span className="flex flex-wrap items-center gap-3 print:hidden">
          <PrintButton />
          <LinkButton variant="secondary" href={back}>
            Back to the {p.kind.toLowerCase()}
          </LinkButton>
          {p.exportable && <ExportLinks workspace={p.workspace} subject={p.subject} id={p.id} />}
        </span>
      }
    />
  );
}

function exactness(reference: Reference, index: number): { tone: "success" | "warning" | "neutral"; text: string } {
  if (reference.unavailable) return { tone: "neutral", text: "Not evaluated" };
  if (reference.exact) return { tone: "success", text: "Exact for these inputs" };
  return { tone: "warning", text: index === 0 ? "Same mean load only" : "Approximation" };
}

/** One row per analytic method: whether it is exact here, what it assumes, and why it was not evaluated. */
export function MethodNotes({ references }: { references: Reference[] }) {
  if (!references.length) return <p className="text-basin-700">No analytic reference applies to this scenario.</p>;
  return (
    <Table className="break-inside-avoid">
      <caption className="sr-only">Each analytic reference with its assumptions</caption>
      <THead>
        <TR>
          <TH>Method</TH>
          <TH>Standing here</TH>
          <TH>Assumes</TH>
        </TR>
      </THead>
      <TBody>
        {references.map((r, i) => {
          const e = exactness(r, i);
          return (
            <TR key={`${r.method}-${i}`} data-testid="report-reference" className="break-inside-avoid">
              <TH scope="row" className="align-top">
                {r.method}
              </TH>
              <TD>
                <Badge tone={e.tone}>{e.text}</Badge>
              </TD>
              <TD>
                {r.assumptions}
                {r.unavailable && <span className="mt-1 block text-basin-700">Not evaluated: {r.unavailable}</span>}
                {r.truncationBound !== undefined && r.truncationBound > 0 && (
                  <span className="mt-1 block text-basin-700">Exact up to a truncated probability mass of about {r.truncationBound.toPrecision(2)}.</span>
                )}
              </TD>
            </TR>
          );
        })}
      </TBody>
    </Table>
  );
}

/** The engine's reasons to read a figure with care, or a line saying there are none. */
export function EngineWarnings({ warnings }: { warnings: { key: string; message: string; where?: string }[] }) {
  if (!warnings.length) return <p className="text-basin-800">The engine raised no warnings about these figures.</p>;
  return (
    <Callout tone="warning" title={warnings.length === 1 ? "Read this before using the figures" : `${warnings.length} reasons to read the figures with care`}>
      <ul className="list-disc pl-5" data-testid="result-warnings">
        {warnings.map((w) => (
          <li key={w.key}>
            {w.where ? <strong className="font-medium">{w.where}: </strong> : null}
            {w.message}
          </li>
        ))}
      </ul>
    </Callout>
  );
}

/** What every report says about its figures, and the caution where the sizing protects people. */
export function Cautions({ safety }: { safety: boolean }) {
  return (
    <>
      <p className="text-basin-900">
        The figures are estimates from a model of the traffic, each with the statistical uncertainty stated beside it. An analytic reference is only as good as its
        assumptions, listed under the method notes.
      </p>
      {safety && <SafetyNote />}
    </>
  );
}

/** Review comments as the report and the review panel show them. */
export const reviewEntries = (comments: ReviewComment[]): ReviewEntry[] =>
  comments.map((c) => ({ id: c.id, body: c.body, decision: c.decision, createdAt: c.createdAt.toISOString(), author: c.author?.name ?? c.author?.email ?? "A former member" }));

const decisionWords: Record<string, string> = { approved: "Approved", "changes-requested": "Changes requested" };

/** The review status, who decided and when, and every comment in order. */
export function ReviewSummary({ status, comments }: { status: ReviewStatus; comments: ReviewEntry[] }) {
  const decisions = comments.filter((c) => c.decision === "approved" || c.decision === "changes-requested");
  const last = decisions[decisions.length - 1];
  return (
    <>
      <p className="flex flex-wrap items-center gap-2 text-basin-950" data-testid="report-reviewer">
        <ReviewBadge status={status} />
        {status !== "unreviewed" && last ? (
          <span>
            {decisionWords[last.decision!]} by <strong>{last.author}</strong> on <LocalTime iso={last.createdAt} />.
          </span>
        ) : (
          <span>{decisions.length ? "Not reviewed since the last change; earlier decisions are listed below and no longer apply." : "No reviewer has decided on this yet."}</span>
        )}
      </p>
      {comments.length > 0 && (
        <ol className="flex flex-col gap-2" aria-label="Review comments">
          {comments.map((c) => (
            <li key={c.id} className="break-inside-avoid rounded-md border border-basin-200 p-3">
              <p className="text-xs text-basin-700">
                <strong className="text-basin-900">{c.author}</strong>
                {c.decision && c.decision !== "unreviewed" ? ` ${decisionWords[c.decision].toLowerCase()}` : " commented"} · <LocalTime iso={c.createdAt} />
              </p>
              {c.body && <p className="mt-1 whitespace-pre-wrap text-basin-950">{c.body}</p>}
            </li>
          ))}
        </ol>
      )}
    </>
  );
}
