"use client";

import Link from "next/link";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { formatDateTime, formatPercent } from "@/lib/client/format";
import { isLive } from "@/lib/client/queries/keys";
import { useRun } from "@/lib/client/queries/runs";
import { DEFAULT_TARGET_GOS, verdictFor } from "@/lib/client/verdict";
import type { RunListItem, RunResponse } from "@/lib/jobs/api-types";
import { JobStatusBadge, ProgressBar, ReviewBadge } from "./status";
import { VerdictBadge } from "./verdict";

export const runLabel = (run: Pick<RunListItem, "name" | "id" | "scenarioName" | "revision">) =>
  run.name || (run.scenarioName ? `${run.scenarioName}${run.revision ? ` (rev. ${run.revision})` : ""}` : `Run ${run.id.slice(0, 8)}`);

/** A run's verdict at the workspace default target, when it has a result. */
export function runVerdict(run: RunResponse) {
  const result = run.result;
  const servers = (run.scenario as { servers?: number } | undefined)?.servers;
  if (!result || !servers) return null;
  return verdictFor({ servers, callCongestion: result.callCongestion, confidence: result.confidence, references: result.references, target: DEFAULT_TARGET_GOS });
}

/** The headline figures of a finished run: its detail is fetched once and cached (lists carry no results). */
function useRunHeadline(workspace: string, run: RunListItem) {
  const finished = run.status === "succeeded" || (run.status === "cancelled" && run.partial);
  const detail = useRun(workspace, finished ? run.id : "", { enabled: finished });
  return detail.data?.result ? { result: detail.data.result, verdict: runVerdict(detail.data) } : null;
}

function HeadlineCells({ workspace, run }: { workspace: string; run: RunListItem }) {
  const headline = useRunHeadline(workspace, run);
  const result = headline?.result;
  return (
    <>
      <TD numeric className="whitespace-nowrap">{result ? `${formatPercent(result.callCongestion.estimate)} ± ${formatPercent(result.callCongestion.halfWidth, 2)}` : "–"}</TD>
      <TD numeric className="whitespace-nowrap">{formatPercent(result?.references[0]?.callCongestion)}</TD>
      <TD>{headline?.verdict ? <VerdictBadge kind={headline.verdict.kind} /> : "–"}</TD>
    </>
  );
}

export function RunTable({ workspace, runs, empty, caption }: { workspace: string; runs: RunListItem[]; empty: string; caption?: string }) {
  if (!runs.length) return <p className="text-sm text-basin-700">{empty}</p>;
  return (
    <Table>
      {caption && <caption className="sr-only">{caption}</caption>}
      <THead>
        <TR>
          <TH>Run</TH>
          <TH>Status</TH>
          <TH numeric>Call congestion</TH>
          <TH numeric className="whitespace-nowrap">Erlang B</TH>
          <TH>Verdict at {formatPercent(DEFAULT_TARGET_GOS)}</TH>
          <TH>Review</TH>
          <TH>Submitted</TH>
        </TR>
      </THead>
      <TBody>
        {runs.map((run) => {
          return (
            <TR key={run.id}>
              <TD>
                <Link className="font-medium text-basin-800 underline-offset-2 hover:underline" href={`/w/${workspace}/runs/${run.id}`}>
                  {runLabel(run)}
                </Link>
              </TD>
              <TD className="min-w-40">
                {isLive(run.status) ? (
                  <ProgressBar fraction={run.progress.fraction} label={run.status === "queued" ? "Queued" : "Running"} />
                ) : (
                  <JobStatusBadge status={run.status} partial={run.partial} />
                )}
              </TD>
              <HeadlineCells workspace={workspace} run={run} />
              <TD>
                <ReviewBadge status={run.reviewStatus} />
              </TD>
              <TD className="whitespace-nowrap">{formatDateTime(run.createdAt)}</TD>
            </TR>
          );
        })}
      </TBody>
    </Table>
  );
}
