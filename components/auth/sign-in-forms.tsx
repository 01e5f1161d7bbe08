"use client";

import { useState } from "react";
import { Button, Field, FormError, Input } from "@/components/ui";
import { useActionForm } from "@/components/forms/use-action-form";
import { signInLinkSchema, signInSchema, type SignInInput, type SignInLinkInput } from "@/lib/schemas/account";
import { requestSignInLink, signInWithPassword } from "@/app/sign-in/actions";

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
            id={`sign-in-tab-${m}`}
            aria-controls="sign-in-panel"
            aria-selected={mode === m}
            onClick={() => setMode(m)}
            className={`rounded-md px-3 py-1.5 font-medium ${mode === m ? "bg-white text-basin-900 shadow-xs" : "text-basin-700 hover:text-basin-900"}`}
          >
            {m === "password" ? "Password" : "E-mail link"}
          </button>
        ))}
      </div>
      <div role="tabpanel" id="sign-in-panel" aria-labelledby={`sign-in-tab-${mode}`}>
        {mode === "password" ? <PasswordForm returnTo={returnTo} /> : <LinkForm returnTo={returnTo} />}
      </div>
    </div>
  );
}

function PasswordForm({ returnTo }: { returnTo?: string }) {
  const { form, onSubmit, message, pending, errors } = useActionForm<SignInInput, Awaited<ReturnType<typeof signInWithPassword>>>({
    schema: signInSchema,
    defaultValues: { email: "", password: "" },
    action: (values) => signInWithPassword(values, returnTo),
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in with password">
      <FormError>{message}</FormError>
      <Field label="E-mail" error={errors.email?.message}>
        <Input type="email" autoComplete="email" {...form.register("email")} />
      </Field>
      <Field label="Password" error={errors.password?.message}>
        <Input type="password" autoComplete="current-password" {...form.register("password")} />
      </Field>
      <Button type="submit" pending={pending}>
        Sign in
      </Button>
    </form>
  );
}

function LinkForm({ returnTo }: { returnTo?: string }) {
  const { form, onSubmit, message, pending, errors } = useActionForm<SignInLinkInput, Awaited<ReturnType<typeof requestSignInLink>>>({
    schema: signInLinkSchema,
    defaultValues: { email: "" },
    action: (values) => requestSignInLink(values, returnTo),
  });
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Sign in with an e-mail link">
      <FormError>{message}</FormError>
      <Field label="E-mail" hint="We send a one-time link that signs you in." error={errors.email?.message}>
        <Input type="email" autoComplete="email" {...form.register("email")} />
      </Field>
      <Button type="submit" pending={pending}>
        Send me a sign-in link
      </Button>
    </form>
  );
}
