"use client";

import { useState, useTransition } from "react";
import { Button, ConfirmDialog, Select, toast } from "@/components/ui";
import { workspaceRoles, type WorkspaceRole } from "@/lib/auth/roles";
import { changeMemberRoleAction, removeMemberAction } from "@/app/w/[workspace]/members/actions";

/** Role picker and remove button for one member row (admins only; the server checks again). */
export function MemberControls({ workspaceSlug, userId, email, role }: { workspaceSlug: string; userId: string; email: string; role: WorkspaceRole }) {
  const [pending, startTransition] = useTransition();
  const [confirming, setConfirming] = useState(false);
  return (
    <div className="flex items-center gap-2">
      <Select
        aria-label={`Role of ${email}`}
        value={role}
        disabled={pending}
        className="h-8 w-32"
        onChange={(event) =>
          startTransition(async () => {
            const result = await changeMemberRoleAction(workspaceSlug, userId, { role: event.target.value });
            if (result.ok) toast.success(result.message ?? "Role changed.");
            else toast.error(result.message);
          })
        }
      >
        {workspaceRoles.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </Select>
      <Button variant="ghost" size="sm" onClick={() => setConfirming(true)}>
        Remove
      </Button>
      <ConfirmDialog
        open={confirming}
        onClose={() => setConfirming(false)}
        title="Remove this member?"
        message={`${email} loses access to this workspace at once.`}
        confirmLabel="Remove"
        danger
        pending={pending}
        onConfirm={() =>
          startTransition(async () => {
            const result = await removeMemberAction(workspaceSlug, userId);
            if (result.ok) toast.success(result.message ?? "Removed.");
            else toast.error(result.message);
            setConfirming(false);
          })
        }
      />
    </div>
  );
}
