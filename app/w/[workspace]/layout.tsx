import type { ReactNode } from "react";
import { getDatabase } from "@/db/client";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { mailboxEnabled } from "@/lib/mail/mailbox";
import { AppShell } from "@/components/shell/app-shell";

export const dynamic = "force-dynamic";

export default async function WorkspaceLayout({ children, params }: { children: ReactNode; params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "workspace.read"), `/w/${slug}`);
  const workspaces = await listWorkspacesForUser(getDatabase(), access.user.id);
  return (
    <AppShell
      workspace={access.workspace}
      role={access.role}
      user={access.user}
      workspaces={workspaces.map((m) => ({ slug: m.workspace.slug, name: m.workspace.name, role: m.role }))}
      mailboxEnabled={mailboxEnabled()}
    >
      {children}
    </AppShell>
  );
}
