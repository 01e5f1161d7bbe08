"use client";

import { useState, useTransition } from "react";
import { Button, ConfirmDialog, toast } from "@/components/ui";
import { revokeInvitationAction } from "@/app/w/[workspace]/members/actions";

export function RevokeInvitationButton({ workspaceSlug, invitationId, email }: { workspaceSlug: string; invitationId: string; email: string }) {
  const [open, setOpen] = useState(false);
  const [pending, startTransition] = useTransition();
  return (
    <>
      <Button variant="ghost" size="sm" onClick={() => setOpen(true)}>
        Withdraw
      </Button>
      <ConfirmDialog
        open={open}
        onClose={() => setOpen(false)}
        title="Withdraw the invitation?"
        message={`The link sent to ${email} will stop working.`}
        confirmLabel="Withdraw"
        danger
        pending={pending}
        onConfirm={() =>
          startTransition(async () => {
            const result = await revokeInvitationAction(workspaceSlug, invitationId);
            if (result.ok) toast.success(result.message ?? "Withdrawn.");
            else toast.error(result.message);
            setOpen(false);
          })
        }
      />
    </>
  );
}
