import "server-only";
import { ZodError } from "zod";
import { AccessError } from "@/lib/auth/access";
import { fieldErrors } from "@/lib/schemas/validation";

/** Every error body: { error: { status, code, message, fields? } }. */
export function jsonError(status: number, code: string, message: string, fields?: Record<string, string>): Response {
  return Response.json({ error: { status, code, message, ...(fields ? { fields } : {}) } }, { status });
}

class BodyError extends Error {}

/** Reads a JSON body with a size cap; malformed JSON is the caller's fault (400), not ours. */
export async function readJsonBody(request: Request, maxBytes = 1_000_000): Promise<unknown> {
  const text = await request.text();
  if (text.length > maxBytes) throw new BodyError(`The request body is larger than ${maxBytes} bytes.`);
  if (!text.trim()) return {};
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new BodyError(`The request body is not valid JSON: ${(error as Error).message}`);
  }
}

export function errorResponse(error: unknown): Response {
  if (error instanceof AccessError) return jsonError(error.status, error.code, error.message);
  if (error instanceof ZodError) return jsonError(400, "invalid-input", "Some fields are not valid.", fieldErrors(error));
  if (error instanceof BodyError) return jsonError(400, "invalid-body", error.message);
  const domain = error as { kind?: unknown; field?: unknown; message?: string };
  if (error instanceof Error && domain.kind === "input") {
    const field = typeof domain.field === "string" ? domain.field : "input";
    return jsonError(400, "invalid-input", error.message, { [field]: error.message });
  }
  if (error instanceof Error && domain.kind === "convergence") {
    return jsonError(422, "did-not-converge", `The method did not converge for these inputs: ${error.message}`);
  }
  console.error(error);
  return jsonError(500, "internal", "Something went wrong on the server; the request was not applied.");
}

/** Wraps a route handler so every failure becomes a JSON error with the right status. */
export function apiRoute<Context>(handler: (request: Request, context: Context) => Promise<Response>) {
  return async (request: Request, context: Context): Promise<Response> => {
    try {
      return await handler(request, context);
    } catch (error) {
      return errorResponse(error);
    }
  };
}
