"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState, useTransition } from "react";
import { useForm, type FieldValues, type Path, type UseFormSetError } from "react-hook-form";
import { Button, Field, FormError, Input } from "@/components/ui";
import { signInLinkSchema, signInSchema, type SignInInput, type SignInLinkInput } from "@/lib/schemas/account";
import { requestSignInLink, signInWithPassword } from "@/app/sign-in/actions";
import type { ActionResult } from "@/lib/schemas/validation";

function applyResult<T extends FieldValues>(result: ActionResult | undefined, setError: UseFormSetError<T>, setMessage: (m: string | null) => void) {
  if (!result || result.ok) return;
  for (const [field, message] of Object.entries(result.fields ?? {})) setError(field as Path<T>, { message });
  setMessage(result.message);
}

export function SignInForms({ returnTo }: { returnTo?: string }) {
  const [mode, setMode] = useState<"password" | "link">("password");
  return (
    <div className="flex flex-col gap-5">
      <div role="tablist" aria-label="Sign-in method" className="grid grid-cols-2 gap-1 rounded-lg bg-basin-100 p-1 text-sm">
        {(["password", "link"] as const).map((m) => (
          <button
            key={m}
            role="tab"
            type="button"
            aria-selected={mode === m}
            onClick={() => setMode(m)}
            className={`rounded-md px-3 py-1.5 font-medium ${mode === m ? "bg-white text-basin-900 shadow-xs" : "text-basin-700 hover:text-basin-900"}`}
          >
            {m === "password" ? "Password" : "E-mail link"}
          </button>
        ))}
      </div>
      {mode === "password" ? <PasswordForm returnTo={returnTo} /> : <LinkForm returnTo={returnTo} />}
    </div>
  );
}

function PasswordForm({ returnTo }: { returnTo?: string }) {
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  const form = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: "", password: "" } });
  const onSubmit = form.handleSubmit((values) =>
    startTransition(async () => {
      setMessage(null);
      applyResult(await signInWithPassword(values, returnTo), form.setError, setMessage);
    }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in with password">
      <FormError>{message}</FormError>
      <Field label="E-mail" error={form.formState.errors.email?.message}>
        <Input type="email" autoComplete="email" {...form.register("email")} />
      </Field>
      <Field label="Password" error={form.formState.errors.password?.message}>
        <Input type="password" autoComplete="current-password" {...form.register("password")} />
      </Field>
      <Button type="submit" pending={pending}>
        Sign in
      </Button>
    </form>
  );
}

function LinkForm({ returnTo }: { returnTo?: string }) {
  const [message, setMessage] = useState<string | null>(null);
  const [pending, startTransition] = useTransition();
  const form = useForm<SignInLinkInput>({ resolver: zodResolver(signInLinkSchema), defaultValues: { email: "" } });
  const onSubmit = form.handleSubmit((values) =>
    startTransition(async () => {
      setMessage(null);
      applyResult(await requestSignInLink(values, returnTo), form.setError, setMessage);
    }),
  );
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in with an e-mail link">
      <FormError>{message}</FormError>
      <Field label="E-mail" hint="We send a one-time link that signs you in." error={form.formState.errors.email?.message}>
        <Input type="email" autoComplete="email" {...form.register("email")} />
      </Field>
      <Button type="submit" pending={pending}>
        Send me a sign-in link
      </Button>
    </form>
  );
}
