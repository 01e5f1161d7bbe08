import type { ReactNode } from "react";
import Link from "next/link";
import { roleAllows, type WorkspaceRole } from "@/lib/auth/roles";
import { RoleBadge } from "@/components/ui";
import { SignOutButton } from "@/components/auth/sign-out-button";
import { NavLink } from "./nav-link";
import { WorkspaceSwitcher } from "./workspace-switcher";

export interface AppShellProps {
  workspace: { slug: string; name: string };
  role: WorkspaceRole;
  user: { email: string; name: string | null };
  workspaces: { slug: string; name: string; role: string }[];
  mailboxEnabled: boolean;
  children: ReactNode;
}

/** Navigation shows what the role allows; every page and handler still checks through the guard. */
export function AppShell({ workspace, role, user, workspaces, mailboxEnabled, children }: AppShellProps) {
  const base = `/w/${workspace.slug}`;
  const links = [
    { href: base, label: "Overview", exact: true, show: true },
    { href: `${base}/scenarios`, label: "Scenarios", show: true },
    { href: `${base}/runs`, label: "Runs", show: true },
    { href: `${base}/sweeps`, label: "Sweeps", show: true },
    { href: `${base}/traffic`, label: "Traffic", show: true },
    { href: `${base}/settings`, label: "Settings", show: true },
    { href: `${base}/members`, label: "Members", show: roleAllows(role, "member.read") },
    { href: `${base}/audit`, label: "Audit log", show: roleAllows(role, "audit.read") },
    { href: `${base}/mailbox`, label: "Mailbox", show: mailboxEnabled && roleAllows(role, "mailbox.read") },
  ];
  return (
    <div className="min-h-screen">
      <header className="bg-basin-950 text-white print:hidden">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-4 px-4 py-3">
          <Link href={base} className="flex items-center gap-2 text-lg font-semibold tracking-tight">
            <img src="/spillway-mark.svg" alt="" width={24} height={24} />
            <span>
              Spill<span className="text-spill-400">way</span>
            </span>
          </Link>
          <WorkspaceSwitcher current={workspace.slug} workspaces={workspaces} />
          <nav aria-label="Workspace" className="flex flex-wrap gap-1">
            {links
              .filter((l) => l.show)
              .map((l) => (
                <NavLink key={l.href} href={l.href} exact={l.exact}>
                  {l.label}
                </NavLink>
              ))}
          </nav>
          <div className="ml-auto flex items-center gap-3 text-sm">
            <span className="text-basin-200" data-testid="signed-in-as">
              {user.name ?? user.email}
            </span>
            <RoleBadge role={role} />
            <SignOutButton variant="secondary" />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-6xl px-4 py-8 print:max-w-none print:p-0">{children}</main>
    </div>
  );
}
