import type { z, ZodError } from "zod";

/** Field path → first message, for forms and 400 responses. */
export function fieldErrors(error: ZodError): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "input";
    fields[key] ??= issue.message;
  }
  return fields;
}

/** The result every server action returns, so forms show messages instead of crashing. */
export type ActionResult<T = undefined> =
  | { ok: true; data: T; message?: string }
  | { ok: false; message: string; fields?: Record<string, string> };

/** Parses a server action's input with the concept's schema; failures come back ready to return to the form. */
export function parseActionInput<S extends z.ZodType>(
  schema: S,
  input: unknown,
): { ok: true; data: z.output<S> } | { ok: false; message: string; fields: Record<string, string> } {
  const parsed = schema.safeParse(input);
  return parsed.success ? { ok: true, data: parsed.data } : { ok: false, message: "Check the highlighted fields.", fields: fieldErrors(parsed.error) };
}
