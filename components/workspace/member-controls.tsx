"use client";

import { useTransition } from "react";
import { Select, toast } from "@/components/ui";
import { workspaceRoles, type WorkspaceRole } from "@/lib/auth/roles";
import { changeMemberRoleAction, removeMemberAction } from "@/app/w/[workspace]/members/actions";
import { ConfirmActionButton } from "./confirm-action-button";

/** Role picker and remove button for one member row (admins only; the server checks again). */
export function MemberControls({ workspaceSlug, userId, email, role }: { workspaceSlug: string; userId: string; email: string; role: WorkspaceRole }) {
  const [pending, startTransition] = useTransition();
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
      <ConfirmActionButton
        label="Remove"
        title="Remove this member?"
        message={`${email} loses access to this workspace at once.`}
        confirmLabel="Remove"
        successMessage="Removed."
        run={() => removeMemberAction(workspaceSlug, userId)}
      />
    </div>
  );
}
