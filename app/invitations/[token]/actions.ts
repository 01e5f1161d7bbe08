"use server";

import { redirect } from "next/navigation";
import { getDatabase } from "@/db/client";
import { acceptInvitation, InvitationError } from "@/db/queries/invitations";
import { signIn } from "@/lib/auth/config";
import { acceptInvitationSchema, joinWithExistingAccountSchema, type AcceptInvitationInput } from "@/lib/schemas/account";
import { fieldErrors, type ActionResult } from "@/lib/schemas/validation";

export async function acceptInvitationAction(input: AcceptInvitationInput): Promise<ActionResult> {
  const parsed = acceptInvitationSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
  let accepted;
  try {
    accepted = await acceptInvitation(getDatabase(), parsed.data);
  } catch (error) {
    if (error instanceof InvitationError) return { ok: false, message: error.message };
    throw error;
  }
  await signIn("credentials", { email: accepted.email, password: parsed.data.password, redirectTo: `/w/${accepted.workspace.slug}` });
  return { ok: true, data: undefined };
}

/** For people who already have an account: join, then sign in as usual. */
export async function joinWithExistingAccountAction(input: { token: string }): Promise<ActionResult> {
  const parsed = joinWithExistingAccountSchema.safeParse(input);
  if (!parsed.success) return { ok: false, message: "This invitation link is malformed." };
  let accepted;
  try {
    accepted = await acceptInvitation(getDatabase(), { token: parsed.data.token });
  } catch (error) {
    if (error instanceof InvitationError) return { ok: false, message: error.message };
    throw error;
  }
  redirect(`/sign-in?returnTo=${encodeURIComponent(`/w/${accepted.workspace.slug}`)}`);
}
