"use server";

import { CredentialsSignin } from "next-auth";
import { redirect } from "next/navigation";
import { getDatabase } from "@/db/client";
import { acceptInvitation, findOpenInvitationByToken, InvitationError } from "@/db/queries/invitations";
import { signIn } from "@/lib/auth/config";
import { acceptInvitationSchema, joinWithExistingAccountSchema, type AcceptInvitationInput } from "@/lib/schemas/account";
import { parseActionInput, type ActionResult } from "@/lib/schemas/validation";

const signInTo = (slug: string) => `/sign-in?returnTo=${encodeURIComponent(`/w/${slug}`)}`;

async function accept(params: Parameters<typeof acceptInvitation>[1]) {
  try {
    return { ok: true as const, accepted: await acceptInvitation(getDatabase(), params) };
  } catch (error) {
    if (error instanceof InvitationError) return { ok: false as const, message: error.message };
    throw error;
  }
}

export async function acceptInvitationAction(input: AcceptInvitationInput): Promise<ActionResult> {
  const parsed = parseActionInput(acceptInvitationSchema, input);
  if (!parsed.ok) return parsed;
  // The new-account form must not attach an existing account: its password is never checked here, so a wrong
  // one would join the workspace and then fail to sign in.
  const found = await findOpenInvitationByToken(getDatabase(), parsed.data.token);
  if (found.status === "open" && found.existingUser?.hasPassword) {
    return { ok: false, message: "This address already has a Spillway account. Reload the page and join with your existing account." };
  }
  const result = await accept(parsed.data);
  if (!result.ok) return result;
  try {
    await signIn("credentials", { email: result.accepted.email, password: parsed.data.password, redirectTo: `/w/${result.accepted.workspace.slug}` });
  } catch (error) {
    // Joined, but sign-in was refused (the sign-in limit): sign in by hand.
    if (error instanceof CredentialsSignin) redirect(signInTo(result.accepted.workspace.slug));
    throw error;
  }
  return { ok: true, data: undefined };
}

/** For people who already have an account: join, then sign in as usual. */
export async function joinWithExistingAccountAction(input: { token: string }): Promise<ActionResult> {
  const parsed = parseActionInput(joinWithExistingAccountSchema, input);
  if (!parsed.ok) return { ok: false, message: "This invitation link is malformed." };
  const result = await accept({ token: parsed.data.token });
  if (!result.ok) return result;
  redirect(signInTo(result.accepted.workspace.slug));
}
