import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { actionDescriptions, allowedActions, roleDescriptions, workspaceActions } from "@/lib/auth/roles";
import { Card, CardBody, CardHeader, CardTitle, PageHeader, RoleBadge } from "@/components/ui";
import { SafetyCaution } from "@/components/workspace/safety-caution";
import { ErlangBCheck } from "@/components/analytic/erlang-b-check";

export const metadata: Metadata = { title: "Overview" };

export default async function WorkspaceOverview({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}`);
  const allowed = new Set(allowedActions(access.role));
  return (
    <div className="flex flex-col gap-6">
      <PageHeader eyebrow="Workspace" title={access.workspace.name} description={access.workspace.description} />
      {access.workspace.safetyCritical && <SafetyCaution />}
      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <CardHeader>
            <CardTitle>Your role</CardTitle>
          </CardHeader>
          <CardBody>
            <p className="flex items-center gap-2 text-sm">
              <RoleBadge role={access.role} /> {roleDescriptions[access.role]}
            </p>
            <ul className="mt-4 flex flex-col gap-1.5 text-sm" aria-label="What your role allows">
              {workspaceActions.map((action) => (
                <li key={action} data-allowed={allowed.has(action)} className={allowed.has(action) ? "text-basin-900" : "text-basin-400 line-through"}>
                  <span aria-hidden="true">{allowed.has(action) ? "✓ " : "– "}</span>
                  {actionDescriptions[action]}
                  <span className="sr-only">{allowed.has(action) ? " (allowed)" : " (not allowed)"}</span>
                </li>
              ))}
            </ul>
          </CardBody>
        </Card>
        <ErlangBCheck />
      </div>
    </div>
  );
}
