"use client";

import Link from "next/link";
import { EmptyState, LinkButton, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { JobStatusBadge, ProgressBar, ReviewBadge } from "@/components/runs/status";
import { formatDateTime } from "@/lib/client/format";
import { isLive } from "@/lib/client/queries/keys";
import { useSweeps } from "@/lib/client/queries/sweeps";
import { sweepKindLabels } from "./sweep-text";
import { sweepLabel } from "./sweep-view";

/** The workspace's sweeps, newest first, with live progress for those still running. */
export function SweepList({ workspace, canStart }: { workspace: string; canStart: boolean }) {
  const query = useSweeps(workspace);
  return (
    <QueryView query={query} label="Loading sweeps" height="h-40">
      {(page) =>
        page.items.length === 0 ? (
          <EmptyState
            title="No sweeps yet"
            description="A sweep runs one scenario over a range of values; a sizing map crosses two parameters; a dimensioning search finds the group the simulation needs."
            action={canStart ? <LinkButton href={`/w/${workspace}/sweeps/new`}>Start a sweep</LinkButton> : undefined}
          />
        ) : (
          <div className="overflow-x-auto">
            <Table>
              <caption className="sr-only">Sweeps, sizing maps and dimensioning searches of this workspace, newest first</caption>
              <THead>
                <TR>
                  <TH>Sweep</TH>
                  <TH>Kind</TH>
                  <TH>Scenario</TH>
                  <TH>Status</TH>
                  <TH>Review</TH>
                  <TH>Submitted</TH>
                </TR>
              </THead>
              <TBody>
                {page.items.map((s) => (
                  <TR key={s.id} data-testid="sweep-row">
                    <TD>
                      <Link className="font-medium text-basin-800 underline-offset-2 hover:underline" href={`/w/${workspace}/sweeps/${s.id}`}>
                        {sweepLabel(s)}
                      </Link>
                    </TD>
                    <TD>{sweepKindLabels[s.kind]}</TD>
                    <TD>{s.scenarioName ? `${s.scenarioName}${s.revision ? ` (rev. ${s.revision})` : ""}` : "Inline scenario"}</TD>
                    <TD className="min-w-44">
                      {isLive(s.status) ? (
                        <ProgressBar fraction={s.progress.fraction} label={s.status === "queued" ? "Queued" : "Running"} detail={`${s.progress.pointsDone} / ${s.progress.pointsPlanned}`} />
                      ) : (
                        <JobStatusBadge status={s.status} />
                      )}
                    </TD>
                    <TD>
                      <ReviewBadge status={s.reviewStatus} />
                    </TD>
                    <TD className="whitespace-nowrap">{formatDateTime(s.createdAt)}</TD>
                  </TR>
                ))}
              </TBody>
            </Table>
            {page.total > page.items.length && (
              <p className="mt-2 text-xs text-basin-700">
                Showing the newest {page.items.length} of {page.total}.
              </p>
            )}
          </div>
        )
      }
    </QueryView>
  );
}
