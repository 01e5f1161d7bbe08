import { z } from "zod";

/**
 * Keyset paging shared by every list endpoint: `limit` rows after an opaque `cursor` (the sort key and id of the
 * last row seen), so new rows never shift a page the way offsets do.
 */
export const pageLimitSchema = z.coerce.number().int("must be an integer").min(1, "must be >= 1").max(100, "must be <= 100").default(25);

export interface Cursor {
  /** The sort column's value of the last row (ISO date, name, …). */
  key: string;
  id: string;
}

const cursorBody = z.tuple([z.string().max(500), z.string().min(1).max(100)]);

// base64url by hand (btoa/atob exist in browsers and Node alike), so the schema stays browser-safe.
const toBase64Url = (text: string) =>
  btoa(String.fromCharCode(...new TextEncoder().encode(text))).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
const fromBase64Url = (text: string) =>
  new TextDecoder("utf-8", { fatal: true }).decode(Uint8Array.from(atob(text.replace(/-/g, "+").replace(/_/g, "/")), (c) => c.charCodeAt(0)));

export function encodeCursor(cursor: Cursor): string {
  return toBase64Url(JSON.stringify([cursor.key, cursor.id]));
}

export const cursorSchema = z
  .string()
  .max(1000, "is not a cursor from this list")
  .transform((text, ctx): Cursor => {
    try {
      const [key, id] = cursorBody.parse(JSON.parse(fromBase64Url(text)));
      return { key, id };
    } catch {
      ctx.addIssue({ code: "custom", message: "is not a cursor from this list; pass nextCursor from the previous page unchanged" });
      return z.NEVER;
    }
  });

export const pageQuerySchema = z.strictObject({
  limit: pageLimitSchema,
  cursor: cursorSchema.optional(),
});

/** Query-string parameters as a plain object; a repeated parameter keeps its last value. */
export function searchParamsObject(url: string | URL): Record<string, string> {
  return Object.fromEntries(new URL(url).searchParams.entries());
}
