"use client";

import { Button, Field, FormError, Input, Select, toast } from "@/components/ui";
import { useActionForm } from "@/components/forms/use-action-form";
import { workspaceRoles } from "@/lib/auth/roles";
import { invitationCreateSchema, type InvitationCreateInput } from "@/lib/schemas/invitation";
import { inviteMemberAction } from "@/app/w/[workspace]/members/actions";

export function InviteForm({ workspaceSlug }: { workspaceSlug: string }) {
  const { form, onSubmit, message, pending, errors } = useActionForm<InvitationCreateInput, Awaited<ReturnType<typeof inviteMemberAction>>>({
    schema: invitationCreateSchema,
    defaultValues: { email: "", role: "engineer" },
    action: (values) => inviteMemberAction(workspaceSlug, values),
    onSuccess: (result, f) => {
      toast.success(result.message ?? "Invitation sent.");
      f.reset({ email: "", role: f.getValues("role") });
    },
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Invite a member">
      <FormError>{message}</FormError>
      <div className="grid gap-4 sm:grid-cols-[1fr_12rem]">
        <Field label="E-mail address" error={errors.email?.message}>
          <Input type="email" autoComplete="off" {...form.register("email")} />
        </Field>
        <Field label="Role" error={errors.role?.message}>
          <Select {...form.register("role")}>
            {workspaceRoles.map((role) => (
              <option key={role} value={role}>
                {role}
              </option>
            ))}
          </Select>
        </Field>
      </div>
      <div>
        <Button type="submit" pending={pending}>
          Send invitation
        </Button>
      </div>
    </form>
  );
}
