import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { RunView } from "@/components/runs/run-view";
import { ReviewSection } from "@/components/review/review-section";

export const metadata: Metadata = { title: "Run" };

export default async function RunPage({ params }: { params: Promise<{ workspace: string; runId: string }> }) {
  const { workspace: slug, runId } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/runs/${runId}`);
  return (
    <RunView
      workspace={slug}
      runId={runId}
      canCancel={roleAllows(access.role, "run.create")}
      safetyCritical={access.workspace.safetyCritical}
      review={<ReviewSection access={access} subjectType="run" subjectId={runId} />}
    />
  );
}
