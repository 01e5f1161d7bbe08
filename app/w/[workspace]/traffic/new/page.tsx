import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { PageHeader } from "@/components/ui";
import { UploadForm } from "@/components/traffic/upload-form";

export const metadata: Metadata = { title: "Upload traffic" };

export default async function NewUploadPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  await guardPage(() => requireWorkspaceAccess(slug, "upload.create"), `/w/${slug}/traffic/new`);
  return (
    <div>
      <PageHeader eyebrow="Measured traffic" title="Upload traffic" description="Choose a CSV, check its first rows, tell Spillway which column is which, and the worker finds the busy hour, the peakedness and the holding-time law." />
      <UploadForm workspace={slug} />
    </div>
  );
}
