import type { ZodError } from "zod";

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
