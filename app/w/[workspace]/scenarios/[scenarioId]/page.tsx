import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { ScenarioPage } from "@/components/scenario/scenario-page";

export const metadata: Metadata = { title: "Scenario" };

export default async function ScenarioRoute({ params }: { params: Promise<{ workspace: string; scenarioId: string }> }) {
  const { workspace: slug, scenarioId } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/scenarios/${scenarioId}`);
  return <ScenarioPage workspace={slug} scenarioId={scenarioId} canEdit={roleAllows(access.role, "scenario.create")} canRun={roleAllows(access.role, "run.create")} />;
}
