// Which client sent a request, for per-client limits. Pure, so the rule is unit-tested.

/**
 * The web server (lib/ops/web-hooks.cjs) overwrites X-Forwarded-For with the socket's address, so without a
 * proxy the header holds exactly one trusted entry. Behind a proxy (`trustProxy`), the last entry is the one
 * that proxy appended; earlier entries are whatever the client claimed.
 */
export function clientAddress(forwardedFor: string | null | undefined, trustProxy: boolean): string {
  const entries = (forwardedFor ?? "").split(",").map((s) => s.trim()).filter(Boolean);
  const chosen = trustProxy ? entries.at(-1) : entries[0];
  return (chosen ?? "unknown").slice(0, 100);
}
