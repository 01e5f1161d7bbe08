import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { Card, CardBody, PageHeader } from "@/components/ui";
import { RunList } from "@/components/runs/run-list";

export const metadata: Metadata = { title: "Runs" };

export default async function RunsPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/runs`);
  return (
    <div>
      <PageHeader eyebrow="Workspace" title="Runs" description="Every simulation run, with its progress, headline result, verdict and review status." />
      <Card>
        <CardBody className="overflow-x-auto">
          <RunList workspace={slug} />
        </CardBody>
      </Card>
    </div>
  );
}
