import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { listReviewComments } from "@/db/queries/reviews";
import { findSweep } from "@/db/queries/sweeps";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { parseTarget } from "@/lib/client/verdict";
import type { SweepResponse } from "@/lib/jobs/api-types";
import { sweepResponse } from "@/lib/jobs/present";
import { reviewEntries } from "@/components/reports/report-parts";
import { SweepReport, type ReportPoint } from "@/components/reports/sweep-report";

export const metadata: Metadata = { title: "Sweep report" };

export default async function SweepReportPage({ params, searchParams }: { params: Promise<{ workspace: string; sweepId: string }>; searchParams: Promise<{ gos?: string }> }) {
  const { workspace: slug, sweepId } = await params;
  const { gos } = await searchParams;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/sweeps/${sweepId}/report`);
  const db = getDatabase();
  const [record, comments] = await Promise.all([findSweep(db, access.workspace.id, sweepId), listReviewComments(db, access.workspace.id, "sweep", sweepId)]);
  if (!record) notFound();
  // The API's shape, dates as ISO strings; the points keep their results for the per-point comparison.
  const sweep: SweepResponse = JSON.parse(JSON.stringify(sweepResponse(record)));
  const points: ReportPoint[] = record.points.map((p) => ({ runId: p.runId, point: p.point, values: p.values, status: p.status, result: p.result }));
  return (
    <SweepReport
      workspace={access.workspace.slug}
      sweep={sweep}
      points={points}
      comments={reviewEntries(comments)}
      safetyCritical={access.workspace.safetyCritical}
      target={parseTarget(typeof gos === "string" ? gos : null)}
    />
  );
}
