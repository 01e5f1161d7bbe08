import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { ReviewSection } from "@/components/review/review-section";
import { SweepView } from "@/components/sweeps/sweep-view";

export const metadata: Metadata = { title: "Sweep" };

export default async function SweepPage({ params }: { params: Promise<{ workspace: string; sweepId: string }> }) {
  const { workspace: slug, sweepId } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/sweeps/${sweepId}`);
  return (
    <SweepView
      workspace={slug}
      sweepId={sweepId}
      canCancel={roleAllows(access.role, "sweep.create")}
      safetyCritical={access.workspace.safetyCritical}
      review={<ReviewSection access={access} subjectType="sweep" subjectId={sweepId} />}
    />
  );
}
