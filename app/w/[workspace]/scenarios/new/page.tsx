import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { PageHeader } from "@/components/ui";
import { ScenarioEditor } from "@/components/scenario/scenario-editor";

export const metadata: Metadata = { title: "New scenario" };

export default async function NewScenarioPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "scenario.create"), `/w/${slug}/scenarios/new`);
  return (
    <div>
      <PageHeader eyebrow="Scenarios" title="New scenario" description="Describe the traffic and the group under study; the formulas' answer appears beside the form as you type." />
      <ScenarioEditor workspace={slug} canEdit canRun={roleAllows(access.role, "run.create")} />
    </div>
  );
}
