// Pure checks the proxy applies before routing, so the rules are unit-tested without a server.

/** Why a path cannot be routed: malformed percent-encoding, or a NUL/control character once decoded. */
export function malformedPath(pathname: string): string | null {
  for (const segment of pathname.split("/")) {
    let decoded: string;
    try {
      decoded = decodeURIComponent(segment);
    } catch {
      return `the path segment "${segment.slice(0, 40)}" is not valid percent-encoding`;
    }
    if (/[\u0000-\u001f\u007f]/.test(decoded)) return "the path contains a control character";
  }
  return null;
}

/** The Content-Security-Policy the app (Next's inline bootstrap, Tailwind, Plotly's injected styles) works under. */
export function contentSecurityPolicy(options: { development: boolean; https: boolean }): string {
  return [
    "default-src 'self'",
    // Next's App Router bootstraps with inline scripts; dev mode's refresh needs eval.
    `script-src 'self' 'unsafe-inline'${options.development ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self' data:",
    `connect-src 'self'${options.development ? " ws:" : ""}`,
    "worker-src 'self' blob:",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(options.https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

export function securityHeaders(options: { development: boolean; https: boolean }): Record<string, string> {
  return {
    "Content-Security-Policy": contentSecurityPolicy(options),
    "X-Content-Type-Options": "nosniff",
    "X-Frame-Options": "DENY",
    "Referrer-Policy": "strict-origin-when-cross-origin",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=(), payment=()",
    ...(options.https ? { "Strict-Transport-Security": "max-age=31536000; includeSubDomains" } : {}),
  };
}
