import "server-only";
import { redirect, forbidden, notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { findMembershipBySlug, type WorkspaceMembership } from "@/db/queries/workspaces";
import { findUserById } from "@/db/queries/users";
import { auth } from "./config";
import { AccessError, decideAccess } from "./access";
import type { WorkspaceAction } from "./roles";

export interface SignedInUser {
  id: string;
  email: string;
  name: string | null;
}

export interface WorkspaceAccess extends WorkspaceMembership {
  user: SignedInUser;
}

/** The signed-in user, or null. Checks the account still exists, so deleted users lose access at once. */
export async function currentUser(): Promise<SignedInUser | null> {
  const session = await auth();
  const id = session?.user?.id;
  if (!id) return null;
  const user = await findUserById(getDatabase(), id);
  return user ? { id: user.id, email: user.email, name: user.name } : null;
}

/** Signed-in only (no workspace): throws AccessError(401). */
export async function requireUser(): Promise<SignedInUser> {
  const user = await currentUser();
  if (!user) throw new AccessError(401, "unauthenticated", "Sign in to continue.");
  return user;
}

/** The one guard: membership of the workspace and a role that allows the action, or AccessError. */
export async function requireWorkspaceAccess(workspaceSlug: string, action: WorkspaceAction): Promise<WorkspaceAccess> {
  const user = await currentUser();
  const membership = user ? await findMembershipBySlug(getDatabase(), user.id, workspaceSlug) : null;
  const decision = decideAccess({ signedIn: !!user, role: membership?.role ?? null, action });
  if (!decision.allowed) throw new AccessError(decision.status, decision.code, decision.message);
  return { ...membership!, user: user! };
}

/** For pages: 401 goes to sign-in, 404 to not-found, 403 to the forbidden page. */
export async function guardPage<T>(check: () => Promise<T>, returnTo: string): Promise<T> {
  try {
    return await check();
  } catch (error) {
    if (!(error instanceof AccessError)) throw error;
    if (error.status === 401) redirect(`/sign-in?returnTo=${encodeURIComponent(returnTo)}`);
    if (error.status === 404) notFound();
    forbidden();
  }
}
