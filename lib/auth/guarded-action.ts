import "server-only";
import { AccessError } from "./access";
import { requireWorkspaceAccess, type WorkspaceAccess } from "./guard";
import type { WorkspaceAction } from "./roles";
import type { ActionResult } from "@/lib/schemas/validation";

/**
 * Server actions' shared frame: the guard first, then the work; refusals and input errors come back
 * as an ActionResult the form can show. Anything else (including Next's redirects) propagates.
 */
export async function guardedAction<T>(
  workspaceSlug: string,
  action: WorkspaceAction,
  work: (access: WorkspaceAccess) => Promise<ActionResult<T>>,
): Promise<ActionResult<T>> {
  try {
    return await work(await requireWorkspaceAccess(workspaceSlug, action));
  } catch (error) {
    if (error instanceof AccessError) return { ok: false, message: error.message };
    const input = error as { kind?: unknown; field?: unknown };
    if (error instanceof Error && input.kind === "input") {
      return { ok: false, message: error.message, fields: typeof input.field === "string" ? { [input.field]: error.message } : undefined };
    }
    throw error;
  }
}
