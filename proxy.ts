// Runs before every route: security headers, malformed paths, server-action checks.
// (Loopback host names and the JSON shape of low-level errors are handled in lib/ops/web-hooks.cjs.)
import { NextResponse, type NextRequest } from "next/server";
import { malformedPath, securityHeaders } from "@/lib/api/request-shape";
import { appOrigin, isDevelopment, servedOverHttps } from "@/lib/config";

/** Next's default limit for a server action's body (experimental.serverActions.bodySizeLimit). */
const serverActionMaxBytes = 1_000_000;

const refuse = (request: NextRequest, status: number, code: string, message: string) =>
  request.nextUrl.pathname.startsWith("/api/")
    ? Response.json({ error: { status, code, message } }, { status })
    : new Response(message, { status, headers: { "content-type": "text/plain; charset=utf-8" } });

function sameSite(request: NextRequest): boolean {
  const origin = request.headers.get("origin");
  if (!origin) return request.headers.get("sec-fetch-site") !== "cross-site";
  if (origin === appOrigin()) return true;
  try {
    return new URL(origin).host === (request.headers.get("x-forwarded-host") ?? request.headers.get("host"));
  } catch {
    return false;
  }
}

/** Server actions that Next itself would answer with a 500: foreign origin, oversized or malformed body. */
async function checkServerAction(request: NextRequest): Promise<Response | null> {
  if (!sameSite(request)) return refuse(request, 403, "cross-origin", "This form was sent from another site.");
  if (Number(request.headers.get("content-length") ?? "0") > serverActionMaxBytes) {
    return refuse(request, 413, "body-too-large", `The form data is larger than ${serverActionMaxBytes} bytes.`);
  }
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) {
    const body = await request.clone().text();
    if (body.length > serverActionMaxBytes) return refuse(request, 413, "body-too-large", `The form data is larger than ${serverActionMaxBytes} bytes.`);
    try {
      JSON.parse(body);
    } catch {
      return refuse(request, 400, "invalid-body", "The form data is malformed.");
    }
  }
  return null;
}

export async function proxy(request: NextRequest) {
  const headers = securityHeaders({ development: isDevelopment(), https: servedOverHttps() });
  const withHeaders = (response: Response) => {
    for (const [name, value] of Object.entries(headers)) response.headers.set(name, value);
    return response;
  };
  const rawPath = new URL(request.url).pathname;
  const problem = malformedPath(rawPath);
  if (problem) return withHeaders(refuse(request, 400, "malformed-path", `The address is malformed: ${problem}.`));
  if (request.method === "POST" && request.headers.has("next-action")) {
    const refused = await checkServerAction(request);
    if (refused) return withHeaders(refused);
  }
  return withHeaders(NextResponse.next());
}

export const config = {
  matcher: "/:path*",
};
