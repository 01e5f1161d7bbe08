"use client";

import Link from "next/link";
import type { ColumnDef } from "@tanstack/react-table";
import { ExplorerTable } from "@/components/lab/explorer-table";
import { QueryView } from "@/components/lab/states";
import { ReviewBadge } from "@/components/runs/status";
import { formatDateTime } from "@/lib/client/format";
import { useRuns } from "@/lib/client/queries/runs";
import { useScenarios } from "@/lib/client/queries/scenarios";
import type { ReviewStatus, RunListItem, ScenarioSummary } from "@/lib/jobs/api-types";

type Row = ScenarioSummary & { review: ReviewStatus; runs: number; author: string };

const reviewLabels: Record<ReviewStatus, string> = { unreviewed: "Not reviewed", approved: "Approved", "changes-requested": "Changes requested" };

/**
 * A scenario's review status is that of the newest finished run of its newest revision: a new revision (or a new
 * run) starts unreviewed, so an approval never carries over to something nobody looked at.
 */
export function scenarioReview(scenario: ScenarioSummary, runs: RunListItem[]): ReviewStatus {
  const latest = runs
    .filter((r) => r.scenarioId === scenario.id && r.revision === scenario.latestRevision && (r.status === "succeeded" || r.status === "cancelled"))
    .sort((a, b) => b.createdAt.localeCompare(a.createdAt))[0];
  return latest?.reviewStatus ?? "unreviewed";
}

export function ScenarioTable({ workspace }: { workspace: string }) {
  const scenarios = useScenarios(workspace);
  const runs = useRuns(workspace, { limit: 100 });
  const columns: ColumnDef<Row, any>[] = [
    {
      accessorKey: "name",
      header: "Scenario",
      cell: ({ row }) => (
        <div>
          <Link href={`/w/${workspace}/scenarios/${row.original.id}`} className="font-medium text-basin-800 underline-offset-2 hover:underline">
            {row.original.name}
          </Link>
          {row.original.description && <p className="line-clamp-1 text-xs text-basin-600">{row.original.description}</p>}
        </div>
      ),
    },
    { accessorKey: "latestRevision", header: "Revision", cell: ({ row }) => <Link className="underline-offset-2 hover:underline" href={`/w/${workspace}/scenarios/${row.original.id}/revisions`}>{row.original.latestRevision}</Link> },
    { accessorKey: "runs", header: "Runs", enableGlobalFilter: false },
    { accessorKey: "review", header: "Review", filterFn: "equalsString", cell: ({ row }) => <ReviewBadge status={row.original.review} /> },
    { accessorKey: "author", header: "Created by" },
    { accessorKey: "updatedAt", header: "Updated", enableGlobalFilter: false, cell: ({ row }) => <span className="whitespace-nowrap">{formatDateTime(row.original.updatedAt)}</span> },
  ];
  return (
    <QueryView query={scenarios} label="Loading scenarios" height="h-64">
      {(items) => {
        const allRuns = runs.data?.items ?? [];
        const rows: Row[] = items.map((s) => ({
          ...s,
          review: scenarioReview(s, allRuns),
          runs: allRuns.filter((r) => r.scenarioId === s.id).length,
          author: s.createdBy?.name ?? s.createdBy?.email ?? "",
        }));
        return (
          <ExplorerTable
            data={rows}
            columns={columns}
            caption="Scenarios of this workspace"
            searchLabel="Search scenarios"
            filters={[{ columnId: "review", label: "Review status", options: Object.entries(reviewLabels).map(([value, label]) => ({ value, label })) }]}
            emptyMessage="No scenarios yet."
            initialSorting={[{ id: "updatedAt", desc: true }]}
          />
        );
      }}
    </QueryView>
  );
}
