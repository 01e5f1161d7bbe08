"use client";

// A sweep's own page: live progress and cancel while its points run, then the curve, the sizing map or the
// dimensioning answer, every point's run, the caution where the sizing protects people, and the review.
import Link from "next/link";
import { useState, type ReactNode } from "react";
import { Button, Callout, Card, CardBody, CardDescription, CardHeader, CardTitle, ConfirmDialog, PageHeader, Table, TBody, TD, TH, THead, TR, toast } from "@/components/ui";
import { ErrorBlock, LoadingBlock } from "@/components/lab/states";
import { SafetyNote } from "@/components/lab/safety-note";
import { JobStatusBadge, ProgressBar, ReviewBadge } from "@/components/runs/status";
import { ReportLinkButton, TargetControl } from "@/components/runs/target-control";
import { errorMessage } from "@/lib/client/api";
import { formatDateTime, formatDuration, formatNumber, formatPercent } from "@/lib/client/format";
import { isLive } from "@/lib/client/queries/keys";
import { useCancelSweep, useSweep } from "@/lib/client/queries/sweeps";
import { sizesSafetyCapacity } from "@/lib/client/safety";
import type { SweepListItem, SweepResponse } from "@/lib/jobs/api-types";
import { DimensioningView, SizingMap, SweepCurveView } from "./sweep-results";
import { dimensioningSentence, parameterLabel, sweepKindLabels } from "./sweep-text";

export const sweepLabel = (s: Pick<SweepListItem, "name" | "id" | "kind" | "scenarioName">) =>
  s.name || `${sweepKindLabels[s.kind]}${s.scenarioName ? ` of ${s.scenarioName}` : ` ${s.id.slice(0, 8)}`}`;

/** Export links of a run or sweep (the API's export routes); `download` keeps the page where it is. */
export function ExportLinks({ workspace, subject, id }: { workspace: string; subject: "runs" | "sweeps"; id: string }) {
  const base = `/api/v1/workspaces/${encodeURIComponent(workspace)}/${subject}/${id}/export`;
  return (
    <span className="flex items-center gap-3 text-sm print:hidden">
      <a className="text-basin-800 underline" href={`${base}.csv`} download>
        Download CSV
      </a>
      <a className="text-basin-800 underline" href={`${base}.json`} download>
        Download JSON
      </a>
    </span>
  );
}

export interface SweepViewProps {
  workspace: string;
  sweepId: string;
  canCancel: boolean;
  safetyCritical: boolean;
  review?: ReactNode;
}

export function SweepView({ workspace, sweepId, canCancel, safetyCritical, review }: SweepViewProps) {
  const query = useSweep(workspace, sweepId);
  const sweep = query.data;
  if (!sweep) {
    return (
      <div className="flex flex-col gap-6">
        <PageHeader eyebrow="Sweep" title="Sweep" description="Loading …" />
        {query.isError ? <ErrorBlock error={query.error} retry={() => void query.refetch()} /> : <LoadingBlock label="Loading the sweep" height="h-96" />}
      </div>
    );
  }
  const safety = safetyCritical || sizesSafetyCapacity(sweep.name, sweep.scenarioName);
  const finished = !isLive(sweep.status);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow={
          sweep.scenarioId ? (
            <Link href={`/w/${workspace}/scenarios/${sweep.scenarioId}`} className="underline-offset-2 hover:underline">
              {sweepKindLabels[sweep.kind]} of {sweep.scenarioName ?? "a scenario"}
              {sweep.revision ? `, revision ${sweep.revision}` : ""}
            </Link>
          ) : (
            sweepKindLabels[sweep.kind]
          )
        }
        title={sweepLabel(sweep)}
        description={
          <span className="flex flex-wrap items-center gap-2">
            <JobStatusBadge status={sweep.status} />
            <ReviewBadge status={sweep.reviewStatus} />
            <span>
              Submitted {formatDateTime(sweep.createdAt)}
              {sweep.submittedBy ? ` by ${sweep.submittedBy.name ?? sweep.submittedBy.email}` : ""}
              {sweep.finishedAt ? ` · took ${formatDuration(sweep.startedAt ?? sweep.createdAt, sweep.finishedAt)}` : ""}
            </span>
          </span>
        }
        actions={
          finished ? (
            <>
              <ReportLinkButton href={`/w/${workspace}/sweeps/${sweep.id}/report`} />
              <ExportLinks workspace={workspace} subject="sweeps" id={sweep.id} />
            </>
          ) : undefined
        }
      />
      <SweepProgress workspace={workspace} sweep={sweep} canCancel={canCancel} />
      {/* Grids and sizing searches carry their own target; a one-parameter sweep's report judges each point against this one. */}
      {finished && sweep.kind === "sweep" && <TargetControl />}
      {sweep.status === "failed" && (
        <Callout tone="danger" title="The sweep failed">
          {sweep.error ?? "No reason was recorded."}
        </Callout>
      )}
      {sweep.status === "cancelled" && (
        <Callout tone="warning" title="Cancelled">
          The sweep was cancelled; the figures below cover the points that finished before.
        </Callout>
      )}
      <SweepResult workspace={workspace} sweep={sweep} />
      {safety && <SafetyNote />}
      <Card>
        <CardHeader>
          <CardTitle as="h2">{sweep.kind === "dimensioning" ? "Probes" : "Point runs"}</CardTitle>
          <CardDescription>One background run per point, all with the base seed (common random numbers).</CardDescription>
        </CardHeader>
        <CardBody className="overflow-x-auto">
          <PointRunsTable workspace={workspace} sweep={sweep} />
        </CardBody>
      </Card>
      {review}
    </div>
  );
}

/** The result section for the sweep's kind, with the in-progress wording while points are still running. */
export function SweepResult({ workspace, sweep }: { workspace: string; sweep: SweepResponse }) {
  const live = isLive(sweep.status);
  const result = sweep.result;
  if (result?.kind === "sweep")
    return (
      <Card>
        <CardHeader>
          <CardTitle as="h2">Blocking against the swept parameter</CardTitle>
          {live && <CardDescription>Points appear as they finish.</CardDescription>}
        </CardHeader>
        <CardBody>
          <SweepCurveView workspace={workspace} curve={result} />
        </CardBody>
      </Card>
    );
  if (result?.kind === "grid")
    return (
      <Card>
        <CardHeader>
          <CardTitle as="h2">Sizing map</CardTitle>
          {live && <CardDescription>Cells fill in as their runs finish.</CardDescription>}
        </CardHeader>
        <CardBody>
          <SizingMap workspace={workspace} map={result} />
        </CardBody>
      </Card>
    );
  if (result?.kind === "dimensioning")
    return (
      <Card>
        <CardHeader>
          <CardTitle as="h2">Dimensioning answer</CardTitle>
        </CardHeader>
        <CardBody>
          <DimensioningView workspace={workspace} answer={result} live={live} />
        </CardBody>
      </Card>
    );
  const definition = sweep.definition as { targetBlocking?: number; measure?: "callCongestion" | "timeCongestion" };
  return (
    <Card>
      <CardBody>
        <p className="text-sm text-basin-800" data-testid={sweep.kind === "dimensioning" ? "dimensioning-answer" : undefined}>
          {sweep.kind === "dimensioning"
            ? dimensioningSentence(null, live, definition.targetBlocking ? { target: definition.targetBlocking, measure: definition.measure ?? "callCongestion" } : undefined)
            : live
              ? "The first points are still running; the figures appear here as they finish."
              : "No point finished, so there is nothing to draw."}
        </p>
      </CardBody>
    </Card>
  );
}

function SweepProgress({ workspace, sweep, canCancel }: { workspace: string; sweep: SweepResponse; canCancel: boolean }) {
  const cancel = useCancelSweep(workspace, sweep.id);
  const [confirming, setConfirming] = useState(false);
  if (!isLive(sweep.status)) return null;
  const p = sweep.progress;
  const unit = sweep.kind === "dimensioning" ? "probes" : "points";
  return (
    <Card>
      <CardBody className="flex flex-col gap-3" aria-live="polite">
        <ProgressBar
          fraction={p.fraction}
          label={sweep.status === "queued" ? "Waiting for a worker" : "Simulating"}
          detail={`${p.pointsDone} of ${sweep.kind === "dimensioning" ? `at most ${p.pointsPlanned}` : p.pointsPlanned} ${unit} · ${Math.round(p.fraction * 100)} %`}
        />
        {canCancel && (
          <div>
            <Button variant="danger" size="sm" onClick={() => setConfirming(true)}>
              Cancel sweep
            </Button>
          </div>
        )}
        <ConfirmDialog
          open={confirming}
          onClose={() => setConfirming(false)}
          title="Cancel this sweep?"
          message="Points not yet started are dropped and running ones stop at their next slice. Points that finished keep their figures."
          confirmLabel="Cancel sweep"
          danger
          pending={cancel.isPending}
          onConfirm={async () => {
            try {
              await cancel.mutateAsync();
              toast.info("Sweep cancelled; finished points are kept.");
            } catch (error) {
              toast.error(errorMessage(error));
            }
            setConfirming(false);
          }}
        />
      </CardBody>
    </Card>
  );
}

export function PointRunsTable({ workspace, sweep }: { workspace: string; sweep: SweepResponse }) {
  if (!sweep.runs.length) return <p className="text-sm text-basin-700">No point has been queued yet.</p>;
  const names = Object.keys(sweep.runs[0].sweepValues);
  return (
    <Table>
      <caption className="sr-only">Runs of this sweep in point order</caption>
      <THead>
        <TR>
          <TH numeric>Point</TH>
          {names.map((n) => (
            <TH key={n} numeric>
              {parameterLabel(n)}
            </TH>
          ))}
          <TH>Status</TH>
          <TH numeric>Call congestion</TH>
          <TH numeric>Time congestion</TH>
          <TH>Run</TH>
        </TR>
      </THead>
      <TBody>
        {sweep.runs.map((r) => (
          <TR key={r.id} data-testid="point-run">
            <TD numeric>{r.sweepPoint + 1}</TD>
            {names.map((n) => (
              <TD key={n} numeric>
                {formatNumber(r.sweepValues[n])}
              </TD>
            ))}
            <TD className="min-w-40">
              {isLive(r.status) ? <ProgressBar fraction={r.progress.fraction} label={r.status === "queued" ? "Queued" : "Running"} /> : <JobStatusBadge status={r.status} partial={r.partial} />}
              {r.error && <span className="block text-xs text-red-800">{r.error}</span>}
            </TD>
            <TD numeric>{r.callCongestion ? `${formatPercent(r.callCongestion.estimate)} (${formatPercent(r.callCongestion.ciLow)} – ${formatPercent(r.callCongestion.ciHigh)})` : "–"}</TD>
            <TD numeric>{formatPercent(r.timeCongestion?.estimate)}</TD>
            <TD>
              <Link className="text-basin-800 underline" href={`/w/${workspace}/runs/${r.id}`}>
                Open<span className="sr-only"> point {r.sweepPoint + 1}</span>
              </Link>
            </TD>
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
