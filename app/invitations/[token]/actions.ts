"use server";

import { CredentialsSignin } from "next-auth";
import { redirect } from "next/navigation";
import { getDatabase } from "@/db/client";
import { signIn } from "@/lib/auth/config";
import { joinWithExistingAccountSchema, type AcceptInvitationInput } from "@/lib/schemas/account";
import { parseActionInput, type ActionResult } from "@/lib/schemas/validation";
import { accept, acceptWithNewAccount } from "./accept";

const signInTo = (slug: string) => `/sign-in?returnTo=${encodeURIComponent(`/w/${slug}`)}`;

export async function acceptInvitationAction(input: AcceptInvitationInput): Promise<ActionResult> {
  const result = await acceptWithNewAccount(getDatabase(), input);
  if (!result.ok) return result;
  const { email, workspace } = result.accepted;
  try {
    await signIn("credentials", { email, password: input.password, redirectTo: `/w/${workspace.slug}` });
  } catch (error) {
    // Joined, but sign-in was refused (the sign-in limit): sign in by hand.
    if (error instanceof CredentialsSignin) redirect(signInTo(workspace.slug));
    throw error;
  }
  return { ok: true, data: undefined };
}

/** For people who already have an account: join, then sign in as usual. */
export async function joinWithExistingAccountAction(input: { token: string }): Promise<ActionResult> {
  const parsed = parseActionInput(joinWithExistingAccountSchema, input);
  if (!parsed.ok) return { ok: false, message: "This invitation link is malformed." };
  const result = await accept(getDatabase(), { token: parsed.data.token });
  if (!result.ok) return result;
  redirect(signInTo(result.accepted.workspace.slug));
}
