import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { findUpload } from "@/db/queries/uploads";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { PageHeader } from "@/components/ui";
import { CharacterisationView } from "@/components/traffic/characterisation-view";

export const metadata: Metadata = { title: "Measured traffic" };

export default async function UploadPage({ params }: { params: Promise<{ workspace: string; uploadId: string }> }) {
  const { workspace: slug, uploadId } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/traffic/${uploadId}`);
  const upload = await findUpload(getDatabase(), access.workspace.id, uploadId);
  if (!upload) notFound();
  return (
    <div>
      <PageHeader eyebrow="Measured traffic" title={upload.fileName} />
      <CharacterisationView workspace={slug} uploadId={uploadId} canCreate={roleAllows(access.role, "scenario.create")} />
    </div>
  );
}
