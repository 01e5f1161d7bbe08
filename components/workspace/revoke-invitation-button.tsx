"use client";

import { revokeInvitationAction } from "@/app/w/[workspace]/members/actions";
import { ConfirmActionButton } from "./confirm-action-button";

export function RevokeInvitationButton({ workspaceSlug, invitationId, email }: { workspaceSlug: string; invitationId: string; email: string }) {
  return (
    <ConfirmActionButton
      label="Withdraw"
      title="Withdraw the invitation?"
      message={`The link sent to ${email} will stop working.`}
      confirmLabel="Withdraw"
      successMessage="Withdrawn."
      run={() => revokeInvitationAction(workspaceSlug, invitationId)}
    />
  );
}
