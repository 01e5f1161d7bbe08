"use client";

import Link from "next/link";
import { Card, CardBody, CardDescription, CardHeader, CardTitle, EmptyState, LinkButton } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { RunTable, runLabel } from "@/components/runs/run-table";
import { ProgressBar } from "@/components/runs/status";
import { useRuns } from "@/lib/client/queries/runs";
import { useSweeps } from "@/lib/client/queries/sweeps";
import type { RunListItem, SweepListItem } from "@/lib/jobs/api-types";

function InProgress({ workspace, runs, sweeps }: { workspace: string; runs: RunListItem[]; sweeps: SweepListItem[] }) {
  if (!runs.length && !sweeps.length) return <p className="text-sm text-basin-700">Nothing is running. Runs and sweeps you start appear here with their progress.</p>;
  return (
    <ul className="flex flex-col gap-4" data-testid="in-progress">
      {runs.map((r) => (
        <li key={r.id}>
          <Link href={`/w/${workspace}/runs/${r.id}`} className="text-sm font-medium text-basin-800 underline-offset-2 hover:underline">
            {runLabel(r)}
          </Link>
          <ProgressBar fraction={r.progress.fraction} label={r.status === "queued" ? "Waiting for a worker" : "Simulating"} detail={`${r.progress.replicationsDone} / ${r.progress.replicationsPlanned} replications`} />
        </li>
      ))}
      {sweeps.map((s) => (
        <li key={s.id}>
          <Link href={`/w/${workspace}/sweeps/${s.id}`} className="text-sm font-medium text-basin-800 underline-offset-2 hover:underline">
            {s.name || s.scenarioName || `${s.kind} ${s.id.slice(0, 8)}`}
          </Link>
          <ProgressBar fraction={s.progress.fraction} label={`${s.kind === "grid" ? "Grid" : s.kind === "dimensioning" ? "Sizing search" : "Sweep"}`} detail={`${s.progress.pointsDone} / ${s.progress.pointsPlanned} points`} />
        </li>
      ))}
    </ul>
  );
}

export function WorkspaceHome({ workspace, canCreate }: { workspace: string; canCreate: boolean }) {
  const live = useRuns(workspace, { status: "queued,running", limit: 20 });
  const recent = useRuns(workspace, { status: "succeeded,cancelled", limit: 50 });
  const sweeps = useSweeps(workspace);
  const waiting = (recent.data?.items ?? []).filter((r) => r.reviewStatus === "unreviewed").slice(0, 6);
  return (
    <div className="flex flex-col gap-6">
      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <CardHeader>
            <CardTitle as="h2">In progress</CardTitle>
            <CardDescription>Updates live while work runs in the background.</CardDescription>
          </CardHeader>
          <CardBody className="min-h-28" aria-live="polite">
            <QueryView query={live} label="Loading runs in progress" height="h-20">
              {(page) => <InProgress workspace={workspace} runs={page.items} sweeps={(sweeps.data?.items ?? []).filter((s) => s.status === "queued" || s.status === "running")} />}
            </QueryView>
          </CardBody>
        </Card>
        <Card>
          <CardHeader>
            <CardTitle as="h2">Waiting for review</CardTitle>
            <CardDescription>Finished results nobody has approved or sent back yet.</CardDescription>
          </CardHeader>
          <CardBody className="min-h-28">
            <QueryView query={recent} label="Loading results" height="h-20">
              {() =>
                waiting.length ? (
                  <ul className="flex flex-col gap-2 text-sm" data-testid="waiting-review">
                    {waiting.map((r) => (
                      <li key={r.id} className="flex justify-between gap-2">
                        <Link href={`/w/${workspace}/runs/${r.id}`} className="font-medium text-basin-800 underline-offset-2 hover:underline">
                          {runLabel(r)}
                        </Link>
                        <span className="text-basin-600">{r.submittedBy?.name ?? r.submittedBy?.email ?? ""}</span>
                      </li>
                    ))}
                  </ul>
                ) : (
                  <p className="text-sm text-basin-700">Every finished result has been reviewed.</p>
                )
              }
            </QueryView>
          </CardBody>
        </Card>
      </div>
      <Card>
        <CardHeader actions={<LinkButton size="sm" variant="secondary" href={`/w/${workspace}/runs`}>All runs</LinkButton>}>
          <CardTitle as="h2">Recent results</CardTitle>
          <CardDescription>Simulated call congestion beside Erlang B, and whether the formula&apos;s sizing holds at the default target.</CardDescription>
        </CardHeader>
        <CardBody className="min-h-40 overflow-x-auto">
          <QueryView query={recent} label="Loading recent results" height="h-32">
            {(page) =>
              page.items.length ? (
                <RunTable workspace={workspace} runs={page.items.slice(0, 8)} empty="" caption="Recent results" />
              ) : (
                <EmptyState
                  title="No results yet"
                  description="Build a scenario, see what the formulas say, then run it to see whether the traffic breaks the sizing."
                  action={canCreate ? <LinkButton href={`/w/${workspace}/scenarios/new`}>New scenario</LinkButton> : undefined}
                />
              )
            }
          </QueryView>
        </CardBody>
      </Card>
    </div>
  );
}
