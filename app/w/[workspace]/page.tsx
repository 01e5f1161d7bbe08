import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { LinkButton, PageHeader } from "@/components/ui";
import { SafetyCaution } from "@/components/workspace/safety-caution";
import { WorkspaceHome } from "@/components/lab/workspace-home";
import { ErlangBCheck } from "@/components/analytic/erlang-b-check";

export const metadata: Metadata = { title: "Overview" };

export default async function WorkspaceOverview({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}`);
  const canCreate = roleAllows(access.role, "scenario.create");
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="Workspace"
        title={access.workspace.name}
        description={access.workspace.description}
        actions={canCreate ? <LinkButton href={`/w/${slug}/scenarios/new`}>New scenario</LinkButton> : undefined}
      />
      {access.workspace.safetyCritical && <SafetyCaution />}
      <WorkspaceHome workspace={slug} canCreate={canCreate} />
      <div className="grid gap-6 lg:grid-cols-2">
        <ErlangBCheck />
      </div>
    </div>
  );
}
