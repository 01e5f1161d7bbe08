import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { Card, CardBody, LinkButton, PageHeader } from "@/components/ui";
import { UploadList } from "@/components/traffic/upload-list";

export const metadata: Metadata = { title: "Measured traffic" };

export default async function TrafficPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/traffic`);
  return (
    <div>
      <PageHeader
        eyebrow="Workspace"
        title="Measured traffic"
        description="Call records and interval counts from a switch, a contact platform or an admissions system: their busy hour, peakedness and holding-time law, and scenarios made from them."
        actions={roleAllows(access.role, "upload.create") ? <LinkButton href={`/w/${slug}/traffic/new`}>Upload traffic</LinkButton> : undefined}
      />
      <Card>
        <CardBody className="overflow-x-auto">
          <UploadList workspace={slug} />
        </CardBody>
      </Card>
    </div>
  );
}
