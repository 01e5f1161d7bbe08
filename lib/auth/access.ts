// The guard's decision, pure: the same answer for route handlers, server actions and pages.
import { roleAllows, type WorkspaceAction, type WorkspaceRole } from "./roles";

export type AccessDecision =
  | { allowed: true }
  | { allowed: false; status: 401 | 403 | 404; code: "unauthenticated" | "forbidden" | "not-found"; message: string };

export function decideAccess(input: {
  signedIn: boolean;
  /** null when the user is not a member of the workspace (or it does not exist). */
  role: WorkspaceRole | null;
  action: WorkspaceAction;
}): AccessDecision {
  if (!input.signedIn) return { allowed: false, status: 401, code: "unauthenticated", message: "Sign in to continue." };
  // Another workspace's data is indistinguishable from missing data.
  if (!input.role) return { allowed: false, status: 404, code: "not-found", message: "No such workspace or record." };
  if (!roleAllows(input.role, input.action)) {
    return {
      allowed: false,
      status: 403,
      code: "forbidden",
      message: `Your role in this workspace (${input.role}) does not allow this: ${input.action}.`,
    };
  }
  return { allowed: true };
}

export class AccessError extends Error {
  constructor(
    readonly status: 401 | 403 | 404,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}
