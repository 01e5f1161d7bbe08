"use server";

import { AuthError, CredentialsSignin } from "next-auth";
import { redirect } from "next/navigation";
import { getDatabase } from "@/db/client";
import { countRecentSignInLinks } from "@/db/queries/users";
import { signIn, signOut } from "@/lib/auth/config";
import { safeReturnPath } from "@/lib/auth/request-checks";
import { signInLinkSchema, signInSchema, type SignInInput, type SignInLinkInput } from "@/lib/schemas/account";
import { signInLimits } from "@/lib/schemas/sign-in-limits";
import { fieldErrors, type ActionResult } from "@/lib/schemas/validation";

export async function signInWithPassword(input: SignInInput, returnTo?: string): Promise<ActionResult> {
  const parsed = signInSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  try {
    await signIn("credentials", { ...parsed.data, redirectTo: safeReturnPath(returnTo) });
  } catch (error) {
    if (error instanceof CredentialsSignin) {
      return error.code === "too-many-attempts"
        ? { ok: false, message: `Too many failed attempts from here. Wait ${signInLimits.windowMinutes} minutes, or sign in with an e-mail link.` }
        : { ok: false, message: "That e-mail address and password do not match an account." };
    }
    if (error instanceof AuthError) return { ok: false, message: "Sign-in failed; please try again." };
    throw error; // the redirect after success
  }
  return { ok: true, data: undefined };
}

/**
 * Every well-formed request ends on the same page after the same work, whether or not the address has an
 * account, so nobody can probe who has one; past the per-address limit nothing more is sent.
 */
export async function requestSignInLink(input: SignInLinkInput, returnTo?: string): Promise<ActionResult> {
  const parsed = signInLinkSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  const { email } = parsed.data;
  if ((await countRecentSignInLinks(getDatabase(), email)) < signInLimits.linksPerAddress) {
    try {
      await signIn("email-link", { email, redirect: false, redirectTo: safeReturnPath(returnTo) });
    } catch (error) {
      if (!(error instanceof AuthError)) throw error;
      if (error.type !== "AccessDenied") console.error("sign-in link request failed:", error);
    }
  }
  redirect("/sign-in/check-email");
}

export async function signOutAction(): Promise<void> {
  await signOut({ redirectTo: "/sign-in?signedOut=1" });
}
