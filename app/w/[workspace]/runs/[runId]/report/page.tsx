import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { listReviewComments } from "@/db/queries/reviews";
import { findRun } from "@/db/queries/runs";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { parseTarget } from "@/lib/client/verdict";
import type { RunResponse } from "@/lib/jobs/api-types";
import { wire } from "@/lib/jobs/present";
import { reviewEntries } from "@/components/reports/report-parts";
import { RunReport } from "@/components/reports/run-report";

export const metadata: Metadata = { title: "Run report" };

export default async function RunReportPage({ params, searchParams }: { params: Promise<{ workspace: string; runId: string }>; searchParams: Promise<{ gos?: string }> }) {
  const { workspace: slug, runId } = await params;
  const { gos } = await searchParams;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/runs/${runId}/report`);
  const db = getDatabase();
  const [record, comments] = await Promise.all([findRun(db, access.workspace.id, runId), listReviewComments(db, access.workspace.id, "run", runId)]);
  if (!record) notFound();
  // The API's shape, dates as ISO strings (what the client islands expect once serialised).
  const run: RunResponse = JSON.parse(JSON.stringify(wire(record)));
  return <RunReport workspace={access.workspace.slug} run={run} comments={reviewEntries(comments)} safetyCritical={access.workspace.safetyCritical} target={parseTarget(typeof gos === "string" ? gos : null)} />;
}
