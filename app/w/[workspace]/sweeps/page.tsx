import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { Card, CardBody, LinkButton, PageHeader } from "@/components/ui";
import { SweepList } from "@/components/sweeps/sweep-list";

export const metadata: Metadata = { title: "Sweeps" };

export default async function SweepsPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/sweeps`);
  const canStart = roleAllows(access.role, "sweep.create");
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="Workspace"
        title="Sweeps and sizing maps"
        description="Blocking across a range of one parameter, holds-or-breaks maps over two, and the group size the simulation needs against the formula's."
        actions={canStart ? <LinkButton href={`/w/${slug}/sweeps/new`}>Start a sweep</LinkButton> : undefined}
      />
      <Card>
        <CardBody>
          <SweepList workspace={slug} canStart={canStart} />
        </CardBody>
      </Card>
    </div>
  );
}
