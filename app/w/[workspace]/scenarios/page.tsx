import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { Card, CardBody, LinkButton, PageHeader } from "@/components/ui";
import { ScenarioTable } from "@/components/scenario/scenario-table";

export const metadata: Metadata = { title: "Scenarios" };

export default async function ScenariosPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/scenarios`);
  return (
    <div>
      <PageHeader
        eyebrow="Workspace"
        title="Scenarios"
        description="Traffic and groups under study, each with its revisions. Open one to edit it, see what the formulas say, and run it."
        actions={roleAllows(access.role, "scenario.create") ? <LinkButton href={`/w/${slug}/scenarios/new`}>New scenario</LinkButton> : undefined}
      />
      <Card>
        <CardBody>
          <ScenarioTable workspace={slug} />
        </CardBody>
      </Card>
    </div>
  );
}
