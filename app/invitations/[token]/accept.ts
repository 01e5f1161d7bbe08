import "server-only";
import type { Database } from "@/db/client";
import { acceptInvitation, findOpenInvitationByToken, InvitationError } from "@/db/queries/invitations";
import type { AcceptInvitationInput } from "@/lib/schemas/account";
import { acceptInvitationSchema } from "@/lib/schemas/account";
import { parseActionInput } from "@/lib/schemas/validation";

type Accepted = Awaited<ReturnType<typeof acceptInvitation>>;
export type AcceptOutcome = { ok: true; accepted: Accepted } | { ok: false; message: string; fields?: Record<string, string> };

/** Accepts, turning the invitation's own refusals (used, revoked, expired) into a message. */
export async function accept(db: Database, params: Parameters<typeof acceptInvitation>[1]): Promise<AcceptOutcome> {
  try {
    return { ok: true, accepted: await acceptInvitation(db, params) };
  } catch (error) {
    if (error instanceof InvitationError) return { ok: false, message: error.message };
    throw error;
  }
}

/**
 * The new-account form: must not attach an existing account, whose password is never checked here; a wrong one
 * would join the workspace and then fail to sign in, leaving a membership behind.
 */
export async function acceptWithNewAccount(db: Database, input: AcceptInvitationInput): Promise<AcceptOutcome> {
  const parsed = parseActionInput(acceptInvitationSchema, input);
  if (!parsed.ok) return parsed;
  const found = await findOpenInvitationByToken(db, parsed.data.token);
  if (found.status === "open" && found.existingUser?.hasPassword) {
    return { ok: false, message: "This address already has a Spillway account. Reload the page and join with your existing account." };
  }
  return accept(db, parsed.data);
}
