"use server";

import { AuthError, CredentialsSignin } from "next-auth";
import { redirect } from "next/navigation";
import { signIn, signOut } from "@/lib/auth/config";
import { signInLinkSchema, signInSchema, type SignInInput, type SignInLinkInput } from "@/lib/schemas/account";
import { fieldErrors, type ActionResult } from "@/lib/schemas/validation";
import { signInRateLimit } from "@/lib/auth/rate-limit";

/** Only same-site paths, so a crafted returnTo cannot send people elsewhere. */
function safeReturnTo(returnTo: unknown): string {
  return typeof returnTo === "string" && returnTo.startsWith("/") && !returnTo.startsWith("//") ? returnTo : "/";
}

export async function signInWithPassword(input: SignInInput, returnTo?: string): Promise<ActionResult> {
  const parsed = signInSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  try {
    await signIn("credentials", { ...parsed.data, redirectTo: safeReturnTo(returnTo) });
  } catch (error) {
    if (error instanceof CredentialsSignin) {
      return error.code === "too-many-attempts"
        ? { ok: false, message: `Too many failed attempts for this address. Wait ${signInRateLimit.windowMinutes} minutes, or sign in with an e-mail link.` }
        : { ok: false, message: "That e-mail address and password do not match an account." };
    }
    if (error instanceof AuthError) return { ok: false, message: "Sign-in failed; please try again." };
    throw error; // the redirect after success
  }
  return { ok: true, data: undefined };
}

export async function requestSignInLink(input: SignInLinkInput, returnTo?: string): Promise<ActionResult> {
  const parsed = signInLinkSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  try {
    await signIn("email-link", { email: parsed.data.email, redirectTo: safeReturnTo(returnTo) });
  } catch (error) {
    // Unknown addresses see the same page as known ones, so nobody can probe who has an account.
    if (error instanceof AuthError && error.type === "AccessDenied") redirect("/sign-in/check-email");
    if (error instanceof AuthError) return { ok: false, message: "The sign-in link could not be sent; please try again in a moment." };
    throw error;
  }
  return { ok: true, data: undefined };
}

export async function signOutAction(): Promise<void> {
  await signOut({ redirectTo: "/sign-in?signedOut=1" });
}
