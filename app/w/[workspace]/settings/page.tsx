import type { Metadata } from "next";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { actionDescriptions, allowedActions, roleAllows, roleDescriptions, workspaceActions } from "@/lib/auth/roles";
import { Card, CardBody, CardHeader, CardTitle, LinkButton, PageHeader, RoleBadge } from "@/components/ui";
import { TokenSettings } from "@/components/settings/token-settings";
import { MailSettings } from "@/components/settings/mail-settings";

export const metadata: Metadata = { title: "Settings" };

export default async function SettingsPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}/settings`);
  const allowed = new Set(allowedActions(access.role));
  return (
    <div className="flex flex-col gap-6">
      <PageHeader eyebrow="Workspace" title="Settings" description="Your role here, API tokens for scripts, and e-mail notices." />
      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <CardHeader actions={roleAllows(access.role, "member.read") ? <LinkButton size="sm" variant="secondary" href={`/w/${slug}/members`}>Members and invitations</LinkButton> : undefined}>
            <CardTitle as="h2">Your role</CardTitle>
          </CardHeader>
          <CardBody>
            <p className="flex items-center gap-2 text-sm">
              <RoleBadge role={access.role} /> {roleDescriptions[access.role]}
            </p>
            <ul className="mt-4 flex flex-col gap-1.5 text-sm" aria-label="What your role allows">
              {workspaceActions.map((action) => (
                <li key={action} data-allowed={allowed.has(action)} className={allowed.has(action) ? "text-basin-900" : "text-basin-500 line-through"}>
                  <span aria-hidden="true">{allowed.has(action) ? "✓ " : "– "}</span>
                  {actionDescriptions[action]}
                  <span className="sr-only">{allowed.has(action) ? " (allowed)" : " (not allowed)"}</span>
                </li>
              ))}
            </ul>
          </CardBody>
        </Card>
        <MailSettings />
      </div>
      <TokenSettings workspace={slug} />
    </div>
  );
}
