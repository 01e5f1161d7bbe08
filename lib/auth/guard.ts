import "server-only";
import { cache } from "react";
import { headers } from "next/headers";
import { redirect, forbidden, notFound } from "next/navigation";
import { getDatabase } from "@/db/client";
import { findMembershipBySlug, type WorkspaceMembership } from "@/db/queries/workspaces";
import { findUserById } from "@/db/queries/users";
import { findApiTokenGrant, type ApiTokenGrant } from "@/db/queries/tokens";
import { auth } from "./config";
import { AccessError, decideAccess } from "./access";
import { bearerToken, isWorkspaceSlug, safeReturnPath } from "./request-checks";
import type { WorkspaceAction } from "./roles";

export interface SignedInUser {
  id: string;
  email: string;
  name: string | null;
}

/** How the caller proved who they are: a browser session, or an API token bound to one workspace. */
export type Caller = { user: SignedInUser; via: "session" } | { user: SignedInUser; via: "token"; grant: ApiTokenGrant };

export interface WorkspaceAccess extends WorkspaceMembership {
  user: SignedInUser;
  via: Caller["via"];
}

const invalidToken = () => new AccessError(401, "unauthenticated", "The API token is not valid: it is unknown, revoked, or its owner is no longer a member of its workspace.");

// Cached per request (React `cache`), so a layout and its page share one session check and one membership lookup.
const resolveCaller = cache(async (): Promise<Caller | null> => {
  const db = getDatabase();
  const token = bearerToken((await headers()).get("authorization"));
  if (token !== null) {
    const grant = token ? await findApiTokenGrant(db, token) : null;
    if (!grant) throw invalidToken();
    const user = await findUserById(db, grant.userId);
    if (!user) throw invalidToken();
    return { via: "token", grant, user: { id: user.id, email: user.email, name: user.name } };
  }
  const id = (await auth())?.user?.id;
  if (!id) return null;
  const user = await findUserById(db, id);
  return user ? { via: "session", user: { id: user.id, email: user.email, name: user.name } } : null;
});

const membershipOf = cache((userId: string, slug: string) => findMembershipBySlug(getDatabase(), userId, slug));

/** The caller (session or API token), or null when neither is presented. An invalid token is a 401, not anonymity. */
export async function currentCaller(): Promise<Caller | null> {
  return resolveCaller();
}

/** The signed-in user, or null. Checks the account still exists, so deleted users lose access at once. */
export async function currentUser(): Promise<SignedInUser | null> {
  try {
    return (await resolveCaller())?.user ?? null;
  } catch (error) {
    if (error instanceof AccessError) return null;
    throw error;
  }
}

/** Signed-in (session or token), no workspace: throws AccessError(401). */
export async function requireCaller(): Promise<Caller> {
  const caller = await resolveCaller();
  if (!caller) throw new AccessError(401, "unauthenticated", "Sign in to continue.");
  return caller;
}

/** The signed-in user (session or token), no workspace: throws AccessError(401). */
export async function requireUser(): Promise<SignedInUser> {
  return (await requireCaller()).user;
}

/**
 * The one guard: membership of the workspace and a role that allows the action, or AccessError. A token acts
 * with its owner's current role and only in its own workspace (elsewhere the workspace looks missing).
 * `sessionOnly` refuses tokens (e.g. creating more tokens).
 */
export async function requireWorkspaceAccess(workspaceSlug: string, action: WorkspaceAction, options: { sessionOnly?: boolean } = {}): Promise<WorkspaceAccess> {
  const caller = await resolveCaller();
  if (caller?.via === "token" && options.sessionOnly) {
    throw new AccessError(403, "forbidden", "This needs a signed-in browser session; an API token cannot do it.");
  }
  let membership: WorkspaceMembership | null = null;
  if (caller && isWorkspaceSlug(workspaceSlug)) {
    membership =
      caller.via === "token"
        ? caller.grant.workspace.slug === workspaceSlug
          ? { workspace: caller.grant.workspace, role: caller.grant.role }
          : null
        : await membershipOf(caller.user.id, workspaceSlug);
  }
  const decision = decideAccess({ signedIn: !!caller, role: membership?.role ?? null, action });
  if (!decision.allowed) throw new AccessError(decision.status, decision.code, decision.message);
  return { ...membership!, user: caller!.user, via: caller!.via };
}

/** For pages: 401 goes to sign-in, 404 to not-found, 403 to the forbidden page. */
export async function guardPage<T>(check: () => Promise<T>, returnTo: string): Promise<T> {
  try {
    return await check();
  } catch (error) {
    if (!(error instanceof AccessError)) throw error;
    if (error.status === 401) redirect(`/sign-in?returnTo=${encodeURIComponent(safeReturnPath(returnTo))}`);
    if (error.status === 404) notFound();
    forbidden();
  }
}
