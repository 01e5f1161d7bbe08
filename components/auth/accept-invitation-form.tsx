"use client";

import { useState, useTransition } from "react";
import { useActionForm } from "@/components/forms/use-action-form";
import { Button, Field, FormError, Input } from "@/components/ui";
import { acceptInvitationSchema, type AcceptInvitationInput } from "@/lib/schemas/account";
import { acceptInvitationAction, joinWithExistingAccountAction } from "@/app/invitations/[token]/actions";

export function AcceptInvitationForm({ token, email }: { token: string; email: string }) {
  const { form, onSubmit, message, pending, errors } = useActionForm<AcceptInvitationInput, Awaited<ReturnType<typeof acceptInvitationAction>>>({
    schema: acceptInvitationSchema,
    defaultValues: { token, name: "", password: "", confirmPassword: "" },
    action: acceptInvitationAction,
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Accept the invitation">
      <FormError>{message}</FormError>
      <Field label="E-mail">
        <Input value={email} readOnly disabled />
      </Field>
      <Field label="Your name" error={errors.name?.message}>
        <Input autoComplete="name" {...form.register("name")} />
      </Field>
      <Field label="Choose a password" hint="At least 10 characters." error={errors.password?.message}>
        <Input type="password" autoComplete="new-password" {...form.register("password")} />
      </Field>
      <Field label="Repeat the password" error={errors.confirmPassword?.message}>
        <Input type="password" autoComplete="new-password" {...form.register("confirmPassword")} />
      </Field>
      <Button type="submit" pending={pending}>
        Create my account and join
      </Button>
    </form>
  );
}

export function JoinWithExistingAccount({ token }: { token: string }) {
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  return (
    <div className="flex flex-col gap-4">
      <FormError>{message}</FormError>
      <Button
        pending={pending}
        onClick={() =>
          startTransition(async () => {
            const result = await joinWithExistingAccountAction({ token });
            if (result && !result.ok) setMessage(result.message);
          })
        }
      >
        Join with my existing account
      </Button>
    </div>
  );
}
