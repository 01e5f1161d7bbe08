import type { Metadata } from "next";
import { getDatabase } from "@/db/client";
import { findOpenInvitationByToken } from "@/db/queries/invitations";
import { AuthFrame, SignInLink } from "@/components/auth/auth-frame";
import { AcceptInvitationForm, JoinWithExistingAccount } from "@/components/auth/accept-invitation-form";
import { Callout, RoleBadge } from "@/components/ui";

export const metadata: Metadata = { title: "Invitation" };
export const dynamic = "force-dynamic";

const closedReasons = {
  unknown: "This invitation link is not known. Check that you copied the whole address.",
  accepted: "This invitation was already accepted. Sign in to reach the workspace.",
  revoked: "This invitation was withdrawn by a workspace admin.",
  expired: "This invitation has expired. Ask a workspace admin for a new one.",
} as const;

export default async function InvitationPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const found = token.length > 200 ? ({ status: "unknown" } as const) : await findOpenInvitationByToken(getDatabase(), token);
  if (found.status !== "open") {
    return (
      <AuthFrame title="Invitation">
        <Callout tone="warning" title="This link cannot be used">
          {closedReasons[found.status]}
        </Callout>
        <SignInLink>Go to sign-in</SignInLink>
      </AuthFrame>
    );
  }
  const { invitation, workspace, existingUser } = found;
  return (
    <AuthFrame
      title={`Join ${workspace.name}`}
      subtitle={
        <span className="inline-flex items-center gap-2">
          You are invited as <RoleBadge role={invitation.role} />
        </span>
      }
    >
      {existingUser?.hasPassword ? <JoinWithExistingAccount token={token} /> : <AcceptInvitationForm token={token} email={invitation.email} />}
    </AuthFrame>
  );
}
