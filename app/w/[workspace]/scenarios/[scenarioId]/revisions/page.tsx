import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { RevisionHistory } from "@/components/scenario/revision-history";

export const metadata: Metadata = { title: "Revisions" };

export default async function RevisionsPage({ params }: { params: Promise<{ workspace: string; scenarioId: string }> }) {
  const { workspace: slug, scenarioId } = await params;
  await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/scenarios/${scenarioId}/revisions`);
  return <RevisionHistory workspace={slug} scenarioId={scenarioId} />;
}
