"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState, useTransition } from "react";
import { useForm, type Path } from "react-hook-form";
import { Button, Field, FormError, Input, Select, toast } from "@/components/ui";
import { workspaceRoles } from "@/lib/auth/roles";
import { invitationCreateSchema, type InvitationCreateInput } from "@/lib/schemas/invitation";
import { inviteMemberAction } from "@/app/w/[workspace]/members/actions";

export function InviteForm({ workspaceSlug }: { workspaceSlug: string }) {
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  const form = useForm<InvitationCreateInput>({ resolver: zodResolver(invitationCreateSchema), defaultValues: { email: "", role: "engineer" } });
  const onSubmit = form.handleSubmit((values) =>
    startTransition(async () => {
      setMessage(null);
      const result = await inviteMemberAction(workspaceSlug, values);
      if (result.ok) {
        toast.success(result.message ?? "Invitation sent.");
        form.reset({ email: "", role: values.role });
        return;
      }
      for (const [field, text] of Object.entries(result.fields ?? {})) form.setError(field as Path<InvitationCreateInput>, { message: text });
      setMessage(result.message);
    }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Invite a member">
      <FormError>{message}</FormError>
      <div className="grid gap-4 sm:grid-cols-[1fr_12rem]">
        <Field label="E-mail address" error={form.formState.errors.email?.message}>
          <Input type="email" autoComplete="off" {...form.register("email")} />
        </Field>
        <Field label="Role" error={form.formState.errors.role?.message}>
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
