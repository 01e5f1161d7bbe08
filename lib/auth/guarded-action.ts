import "server-only";
import type { z } from "zod";
import { AccessError } from "./access";
import { requireWorkspaceAccess, type WorkspaceAccess } from "./guard";
import type { WorkspaceAction } from "./roles";
import { parseActionInput, type ActionResult } from "@/lib/schemas/validation";

/**
 * Server actions' shared frame: the guard first, then the input parsed with the concept's schema, then the
 * work; refusals and input errors come back as an ActionResult the form can show. Anything else (including
 * Next's redirects) propagates.
 */
export async function guardedAction<S extends z.ZodType, T>(
  workspaceSlug: string,
  action: WorkspaceAction,
  schema: S,
  input: unknown,
  work: (access: WorkspaceAccess, value: z.output<S>) => Promise<ActionResult<T>>,
): Promise<ActionResult<T>> {
  try {
    const access = await requireWorkspaceAccess(workspaceSlug, action);
    const parsed = parseActionInput(schema, input);
    if (!parsed.ok) return parsed;
    return await work(access, parsed.data);
  } catch (error) {
    if (error instanceof AccessError) return { ok: false, message: error.message };
    const input = error as { kind?: unknown; field?: unknown };
    if (error instanceof Error && input.kind === "input") {
      return { ok: false, message: error.message, fields: typeof input.field === "string" ? { [input.field]: error.message } : undefined };
    }
    throw error;
  }
}
