import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { PageHeader } from "@/components/ui";
import { SweepForm } from "@/components/sweeps/sweep-form";

export const metadata: Metadata = { title: "Start a sweep" };

export default async function NewSweepPage({ params, searchParams }: { params: Promise<{ workspace: string }>; searchParams: Promise<{ scenario?: string; kind?: string }> }) {
  const { workspace: slug } = await params;
  const { scenario, kind } = await searchParams;
  const initialKind = kind === "grid" || kind === "dimensioning" ? kind : undefined;
  await guardPage(() => requireWorkspaceAccess(slug, "sweep.create"), `/w/${slug}/sweeps/new`);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader eyebrow="Sweeps" title="Start a sweep" description="Choose a scenario, what to vary and what to compare against. The points run in the background; you can leave this page." />
      <SweepForm workspace={slug} initialScenarioId={typeof scenario === "string" ? scenario : undefined} initialKind={initialKind} />
    </div>
  );
}
