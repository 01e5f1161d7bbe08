import "server-only";
import { ZodError } from "zod";
import { AccessError } from "@/lib/auth/access";
import { bearerToken } from "@/lib/auth/request-checks";
import { appOrigin } from "@/lib/config";
import { fieldErrors } from "@/lib/schemas/validation";

/** Every error body: { error: { status, code, message, fields? } }. */
export function jsonError(status: number, code: string, message: string, fields?: Record<string, string>, headers?: HeadersInit): Response {
  return Response.json({ error: { status, code, message, ...(fields ? { fields } : {}) } }, { status, headers });
}

/** A refusal the route wrapper produces itself (cross-origin, wrong media type, body too large, malformed body). */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

const bodyTooLarge = (maxBytes: number) => new ApiError(413, "body-too-large", `The request body is larger than ${maxBytes} bytes.`);

/** Default cap on any request body of a JSON route; routes may lower it (or raise it for uploads). */
export const defaultMaxBodyBytes = 1_000_000;

/** Reads the body as text, refusing as soon as more than `maxBytes` have arrived (never buffers more). */
export async function readBodyText(request: Request, maxBytes = defaultMaxBodyBytes): Promise<string> {
  const declared = Number(request.headers.get("content-length") ?? "0");
  if (declared > maxBytes) throw bodyTooLarge(maxBytes);
  if (!request.body) return "";
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw bodyTooLarge(maxBytes);
    }
    chunks.push(value);
  }
  return new TextDecoder().decode(Buffer.concat(chunks));
}

/** Reads a JSON body with a size cap; malformed JSON is the caller's fault (400), not ours. */
export async function readJsonBody(request: Request, maxBytes = defaultMaxBodyBytes): Promise<unknown> {
  const text = await readBodyText(request, maxBytes);
  if (!text.trim()) return {};
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new ApiError(400, "invalid-body", `The request body is not valid JSON: ${(error as Error).message}`);
  }
}

/** Domain failures by their `kind`: the caller's input (400) or a case the method cannot answer (422), never 500. */
const domainFailures: Record<string, { status: number; code: string }> = {
  input: { status: 400, code: "invalid-input" },
  convergence: { status: 422, code: "did-not-converge" },
  "too-large": { status: 422, code: "too-large-for-interactive" },
  "no-answer": { status: 422, code: "no-finite-answer" },
  busy: { status: 429, code: "too-many-evaluations" },
};

export function errorResponse(error: unknown): Response {
  if (error instanceof AccessError) return jsonError(error.status, error.code, error.message);
  if (error instanceof ApiError) return jsonError(error.status, error.code, error.message);
  if (error instanceof ZodError) return jsonError(400, "invalid-input", "Some fields are not valid.", fieldErrors(error));
  const domain = error as { kind?: unknown; field?: unknown };
  const failure = error instanceof Error && typeof domain.kind === "string" ? domainFailures[domain.kind] : undefined;
  if (failure) {
    if (domain.kind === "input") {
      const field = typeof domain.field === "string" ? domain.field : "input";
      // Errors that know every failing field (ScenarioError) send them all, keyed by form path.
      const all = (error as { fields?: unknown }).fields;
      const fields = all && typeof all === "object" && Object.keys(all).length ? (all as Record<string, string>) : { [field]: (error as Error).message };
      return jsonError(400, failure.code, (error as Error).message, fields);
    }
    const message = domain.kind === "convergence" ? `The method did not converge for these inputs: ${(error as Error).message}` : (error as Error).message;
    return jsonError(failure.status, failure.code, message);
  }
  console.error(error);
  return jsonError(500, "internal", "Something went wrong on the server; the request was not applied.");
}

const stateChangingMethods = new Set(["POST", "PUT", "PATCH", "DELETE"]);

export interface ApiRouteOptions {
  /** Largest body accepted, counted while it streams in. */
  maxBodyBytes?: number;
  /** Media types accepted for a body (uploads add theirs); JSON by default. */
  contentTypes?: readonly string[];
}

/**
 * Cross-site request forgery: a state-changing request from a browser must come from this site. Browsers send
 * Origin on every cross-origin POST/PUT/PATCH/DELETE (and Sec-Fetch-Site); clients that send neither are not
 * browsers and cannot carry someone else's cookie. Requests with an API token carry no cookie at all.
 */
function isCrossSite(request: Request): boolean {
  const origin = request.headers.get("origin");
  if (origin) {
    if (origin === appOrigin()) return false;
    const host = request.headers.get("x-forwarded-host") ?? request.headers.get("host");
    try {
      return !host || new URL(origin).host !== host;
    } catch {
      return true; // "null" and other opaque origins
    }
  }
  const site = request.headers.get("sec-fetch-site");
  return !!site && site !== "same-origin" && site !== "none";
}

function checkRequest(request: Request, options: ApiRouteOptions): Request {
  const maxBytes = options.maxBodyBytes ?? defaultMaxBodyBytes;
  if (Number(request.headers.get("content-length") ?? "0") > maxBytes) throw bodyTooLarge(maxBytes);
  if (!stateChangingMethods.has(request.method)) return request;
  const withToken = bearerToken(request.headers.get("authorization")) !== null;
  if (!withToken && isCrossSite(request)) {
    throw new ApiError(403, "cross-origin", "This request came from another site; Spillway only accepts changes from its own pages or with an API token.");
  }
  const contentType = request.headers.get("content-type");
  const hasBody = Number(request.headers.get("content-length") ?? "0") > 0 || request.headers.has("transfer-encoding");
  const accepted = options.contentTypes ?? ["application/json"];
  const mediaType = contentType?.split(";")[0].trim().toLowerCase();
  if ((contentType || hasBody) && !accepted.includes(mediaType ?? "")) {
    throw new ApiError(415, "unsupported-media-type", `Send the body as ${accepted.join(" or ")}${contentType ? `, not ${mediaType}` : ""}.`);
  }
  if (!request.body) return request;
  // Handlers that read the body themselves (request.json()) are capped as well, while it streams.
  let seen = 0;
  const capped = request.body.pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      transform(chunk, controller) {
        seen += chunk.byteLength;
        if (seen > maxBytes) controller.error(bodyTooLarge(maxBytes));
        else controller.enqueue(chunk);
      },
    }),
  );
  return new Request(request, { body: capped, duplex: "half" } as RequestInit);
}

/**
 * Wraps a route handler: refuses cross-site and wrongly typed state-changing requests, caps the body while it
 * streams, and turns every failure into the JSON error shape with the right status.
 */
export function apiRoute<Context>(handler: (request: Request, context: Context) => Promise<Response>, options: ApiRouteOptions = {}) {
  return async (request: Request, context: Context): Promise<Response> => {
    try {
      return await handler(checkRequest(request, options), context);
    } catch (error) {
      const cause = (error as { cause?: unknown })?.cause;
      return errorResponse(cause instanceof ApiError ? cause : error);
    }
  };
}
