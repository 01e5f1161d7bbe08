// Pure checks on what a request carries, shared by the guard, the sign-in pages and the route wrapper.

/**
 * Where to go after signing in: only a path on this site. Rejects protocol-relative (`//host`), backslash
 * (`/\host`, which browsers treat as `//host`), encoded variants of both, control characters and anything with
 * a scheme, so a crafted link cannot send a signed-in person elsewhere.
 */
export function safeReturnPath(returnTo: unknown, fallback = "/"): string {
  if (typeof returnTo !== "string" || returnTo.length > 2000) return fallback;
  let decoded: string;
  try {
    decoded = decodeURIComponent(returnTo);
  } catch {
    return fallback;
  }
  for (const candidate of [returnTo, decoded]) {
    if (!candidate.startsWith("/")) return fallback;
    if (/^\/[\/\\]/.test(candidate) || /[\u0000-\u001f\u007f\\]/.test(candidate)) return fallback;
  }
  // The final word: resolved against a dummy origin, the result must stay on that origin.
  const base = "http://spillway.invalid";
  const resolved = new URL(returnTo, base);
  return resolved.origin === base ? `${resolved.pathname}${resolved.search}${resolved.hash}` : fallback;
}

/** The token of an `Authorization: Bearer …` header; "" for a malformed Bearer header, null when there is none. */
export function bearerToken(authorization: string | null | undefined): string | null {
  if (!authorization) return null;
  const match = /^Bearer\s+(.*)$/i.exec(authorization.trim());
  if (!match) return null;
  const token = match[1].trim();
  return /^[A-Za-z0-9_\-]{20,200}$/.test(token) ? token : "";
}

/** Workspace slugs are lower-case words joined by hyphens; anything else (NUL bytes, `%`) is simply not found. */
export function isWorkspaceSlug(slug: string): boolean {
  return /^[a-z0-9](?:[a-z0-9-]{0,62}[a-z0-9])?$/.test(slug);
}
