"use client";

import Link from "next/link";
import { useState, type ReactNode } from "react";
import { Button, Callout, Card, CardBody, CardDescription, CardHeader, CardTitle, ConfirmDialog, PageHeader, Stat, StatGroup, toast } from "@/components/ui";
import { ErrorBlock, LoadingBlock } from "@/components/lab/states";
import { SafetyNote } from "@/components/lab/safety-note";
import { stopReasons } from "@/components/reports/run-notes";
import { errorMessage } from "@/lib/client/api";
import { formatDateTime, formatDuration, formatErlangs, formatNumber, formatPercent } from "@/lib/client/format";
import { isLive } from "@/lib/client/queries/keys";
import { useCancelRun, useRun } from "@/lib/client/queries/runs";
import { sizesSafetyCapacity } from "@/lib/client/safety";
import { erlangBTraffic, verdictFor } from "@/lib/client/verdict";
import type { RunResponse } from "@/lib/jobs/api-types";
import type { SimulationResult } from "@/lib/simulation";
import { ConvergenceChart, OccupancyChart, ReplicationChart, SegmentChart } from "./run-charts";
import { ResultTable } from "./result-table";
import { runLabel } from "./run-table";
import { SegmentTable } from "./segment-table";
import { JobStatusBadge, ProgressBar, ReviewBadge } from "./status";
import { ReportLinkButton, TargetControl, useTarget } from "./target-control";
import { VerdictBadge } from "./verdict";
import { WorkerNotice } from "./worker-notice";

export interface RunViewProps {
  workspace: string;
  runId: string;
  canCancel: boolean;
  safetyCritical: boolean;
  /** The review panel, rendered on the server. */
  review?: ReactNode;
}

export function RunView({ workspace, runId, canCancel, safetyCritical, review }: RunViewProps) {
  const query = useRun(workspace, runId);
  const run = query.data;
  if (!run) {
    return (
      <div className="flex flex-col gap-6">
        <PageHeader eyebrow="Run" title="Run" description="Loading …" />
        {query.isError ? <ErrorBlock error={query.error} retry={() => void query.refetch()} /> : <LoadingBlock label="Loading the run" height="h-96" />}
      </div>
    );
  }
  const scenario = run.scenario as { servers?: number } | undefined;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow={
          run.scenarioId ? (
            <Link href={`/w/${workspace}/scenarios/${run.scenarioId}`} className="underline-offset-2 hover:underline">
              Scenario{run.revision ? `, revision ${run.revision}` : ""}
            </Link>
          ) : (
            "Run"
          )
        }
        title={runLabel(run)}
        description={
          <span className="flex flex-wrap items-center gap-2">
            <JobStatusBadge status={run.status} partial={run.partial} />
            <ReviewBadge status={run.reviewStatus} />
            <span>
              Submitted {formatDateTime(run.createdAt)}
              {run.submittedBy ? ` by ${run.submittedBy.name ?? run.submittedBy.email}` : ""} · seed {run.seed}
              {run.finishedAt ? ` · took ${formatDuration(run.startedAt ?? run.createdAt, run.finishedAt)}` : ""}
            </span>
          </span>
        }
        actions={
          run.result ? (
            <>
              <ReportLinkButton href={`/w/${workspace}/runs/${run.id}/report`} />
              <a className="text-sm text-basin-800 underline" href={`/api/v1/workspaces/${workspace}/runs/${run.id}/export.csv`} download>
                CSV
              </a>
              <a className="text-sm text-basin-800 underline" href={`/api/v1/workspaces/${workspace}/runs/${run.id}/export.json`} download>
                JSON
              </a>
            </>
          ) : undefined
        }
      />
      <LiveProgress workspace={workspace} run={run} canCancel={canCancel} />
      {run.status === "failed" && (
        <Callout tone="danger" title="The run failed">
          {run.error ?? "No reason was recorded."}
        </Callout>
      )}
      {run.result && <RunResult run={run} result={run.result} servers={scenario?.servers ?? 0} safety={safetyCritical || sizesSafetyCapacity(run.name)} />}
      {review}
    </div>
  );
}

function LiveProgress({ workspace, run, canCancel }: { workspace: string; run: RunResponse; canCancel: boolean }) {
  const cancel = useCancelRun(workspace, run.id);
  const [confirming, setConfirming] = useState(false);
  if (!isLive(run.status)) return null;
  const p = run.progress;
  return (
    <Card>
      <CardBody className="flex flex-col gap-3" aria-live="polite">
        <WorkerNotice notice={run.workerNotice} />
        <ProgressBar
          fraction={p.fraction}
          label={run.status === "queued" ? "Waiting for a worker" : "Simulating"}
          detail={`${p.replicationsDone} of ${p.replicationsPlanned} replications · ${Math.round(p.fraction * 100)} %`}
        />
        {canCancel && (
          <div>
            <Button variant="danger" size="sm" onClick={() => setConfirming(true)}>
              Cancel run
            </Button>
          </div>
        )}
        <ConfirmDialog
          open={confirming}
          onClose={() => setConfirming(false)}
          title="Cancel this run?"
          message="Chunks still queued are dropped and running ones stop at their next slice. Whatever finished is kept as a partial result, marked as such."
          confirmLabel="Cancel run"
          danger
          pending={cancel.isPending}
          onConfirm={async () => {
            try {
              await cancel.mutateAsync();
              toast.info("Run cancelled; the finished part is kept.");
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

function RunResult({ run, result, servers, safety }: { run: RunResponse; result: SimulationResult; servers: number; safety: boolean }) {
  const target = useTarget();
  const verdict = servers ? verdictFor({ servers, callCongestion: result.callCongestion, confidence: result.confidence, references: result.references, target }) : null;
  const erlangB = result.references[0];
  return (
    <>
      {result.warnings.length > 0 && (
        <Callout tone="warning" title={result.warnings.length === 1 ? "Read this before using the figures" : `${result.warnings.length} reasons to read the figures with care`}>
          <ul className="list-disc pl-5" data-testid="result-warnings">
            {result.warnings.map((w) => (
              <li key={w.code + (w.measure ?? "")}>{w.message}</li>
            ))}
          </ul>
        </Callout>
      )}
      {run.partial && (
        <Callout tone="warning" title="Partial result">
          The run was cancelled; these figures cover {result.replications} replications finished before.
        </Callout>
      )}
      {verdict && (
        <Card>
          <CardHeader actions={<VerdictBadge kind={verdict.kind} />}>
            <CardTitle as="h2">Verdict</CardTitle>
          </CardHeader>
          <CardBody className="flex flex-col gap-4">
            <p className="text-base text-basin-950" data-testid="verdict">
              {verdict.sentence}
            </p>
            <TargetControl />
            {safety && <SafetyNote />}
          </CardBody>
        </Card>
      )}
      <StatGroup>
        <Stat label="Simulated call congestion" value={formatPercent(result.callCongestion.estimate)} hint={`± ${formatPercent(result.callCongestion.halfWidth, 2)} at ${Math.round(result.confidence * 100)} %`} tone={verdict?.kind === "breaks" ? "danger" : "default"} />
        <Stat label="Erlang B at the same mean load" value={formatPercent(erlangB?.callCongestion)} hint={`${formatErlangs(erlangBTraffic(result.references) ?? result.offeredTraffic)} offered to the ${servers} circuits`} />
        <Stat label="Carried traffic" value={formatErlangs(result.carriedTraffic.estimate)} hint={`± ${formatErlangs(result.carriedTraffic.halfWidth, 2)}`} />
        <Stat label="Replications" value={formatNumber(result.replications)} hint={`${formatNumber(result.calls)} calls measured; ${stopReasons[result.stopReason]}`} />
      </StatGroup>
      <Card>
        <CardHeader>
          <CardTitle as="h2">Simulated against the formulas</CardTitle>
        </CardHeader>
        <CardBody className="overflow-x-auto">
          <ResultTable result={result} />
        </CardBody>
      </Card>
      {result.segments?.length ? (
        <Card>
          <CardHeader>
            <CardTitle as="h2">Blocking through the load cycle</CardTitle>
            <CardDescription>Each profile segment on its own: the cycle average above can hide a busy stretch.</CardDescription>
          </CardHeader>
          <CardBody className="flex flex-col gap-4">
            <SegmentChart result={result} />
            <SegmentTable result={result} />
          </CardBody>
        </Card>
      ) : null}
      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <CardBody>
            <ReplicationChart result={result} />
          </CardBody>
        </Card>
        <Card>
          <CardBody>
            <ConvergenceChart result={result} />
          </CardBody>
        </Card>
      </div>
      {servers > 0 && result.occupancy.length === servers + 1 && (
        <Card>
          <CardBody>
            <OccupancyChart result={result} servers={servers} />
          </CardBody>
        </Card>
      )}
    </>
  );
}
