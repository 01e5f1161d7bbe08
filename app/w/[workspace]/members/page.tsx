import type { Metadata } from "next";
import { getDatabase } from "@/db/client";
import { listMembers } from "@/db/queries/members";
import { listOpenInvitations } from "@/db/queries/invitations";
import { guardPage, requireWorkspaceAccess } from "@/lib/auth/guard";
import { roleAllows } from "@/lib/auth/roles";
import { Card, CardBody, CardHeader, CardTitle, EmptyState, PageHeader, RoleBadge, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { InviteForm } from "@/components/workspace/invite-form";
import { RevokeInvitationButton } from "@/components/workspace/revoke-invitation-button";
import { MemberControls } from "@/components/workspace/member-controls";

export const metadata: Metadata = { title: "Members" };

const dateFormat = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeZone: "UTC" });

export default async function MembersPage({ params }: { params: Promise<{ workspace: string }> }) {
  const { workspace: slug } = await params;
  const access = await guardPage(() => requireWorkspaceAccess(slug, "member.read"), `/w/${slug}/members`);
  const db = getDatabase();
  const canInvite = roleAllows(access.role, "member.invite");
  const canManage = roleAllows(access.role, "member.manage");
  const [members, invitations] = await Promise.all([listMembers(db, access.workspace.id), canInvite ? listOpenInvitations(db, access.workspace.id) : []]);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Members" description={`People with access to ${access.workspace.name}, and their roles here.`} />
      <Table>
        <THead>
          <TR>
            <TH>Name</TH>
            <TH>E-mail</TH>
            <TH>Role</TH>
            <TH>Member since</TH>
          </TR>
        </THead>
        <TBody>
          {members.map((m) => (
            <TR key={m.userId}>
              <TD>{m.name ?? "—"}</TD>
              <TD>{m.email}</TD>
              <TD>{canManage ? <MemberControls workspaceSlug={slug} userId={m.userId} email={m.email} role={m.role} /> : <RoleBadge role={m.role} />}</TD>
              <TD>{dateFormat.format(m.joinedAt)}</TD>
            </TR>
          ))}
        </TBody>
      </Table>
      {canInvite && (
        <div className="grid gap-6 lg:grid-cols-2">
          <Card>
            <CardHeader>
              <CardTitle>Invite someone</CardTitle>
            </CardHeader>
            <CardBody>
              <InviteForm workspaceSlug={slug} />
            </CardBody>
          </Card>
          <Card>
            <CardHeader>
              <CardTitle>Open invitations</CardTitle>
            </CardHeader>
            <CardBody>
              {invitations.length === 0 ? (
                <EmptyState title="No open invitations" />
              ) : (
                <ul className="flex flex-col divide-y divide-basin-100 text-sm" aria-label="Open invitations">
                  {invitations.map((inv) => (
                    <li key={inv.id} className="flex items-center gap-3 py-2">
                      <span className="flex-1">{inv.email}</span>
                      <RoleBadge role={inv.role} />
                      <span className="text-xs text-basin-600">until {dateFormat.format(inv.expiresAt)}</span>
                      <RevokeInvitationButton workspaceSlug={slug} invitationId={inv.id} email={inv.email} />
                    </li>
                  ))}
                </ul>
              )}
            </CardBody>
          </Card>
        </div>
      )}
    </div>
  );
}
