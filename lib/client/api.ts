// The browser's one way to call /api/v1: JSON in, JSON out, and every refusal thrown as an ApiError with the
// server's own { error: { status, code, message, fields } } so forms and pages show the server's words.

/** Mirrors the server's error body (lib/api/respond.ts `jsonError`). */
export interface ApiErrorBody {
  status: number;
  code: string;
  message: string;
  fields?: Record<string, string>;
}

export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly fields: Record<string, string>;
  constructor(body: ApiErrorBody) {
    super(body.message);
    this.name = "ApiError";
    this.status = body.status;
    this.code = body.code;
    this.fields = body.fields ?? {};
  }
}

/** The message to show for any failure a query or mutation can raise. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return String(error);
}

function isErrorBody(value: unknown): value is { error: ApiErrorBody } {
  const inner = (value as { error?: Partial<ApiErrorBody> } | null)?.error;
  return !!inner && typeof inner.message === "string" && typeof inner.status === "number";
}

export interface ApiFetchOptions {
  method?: "GET" | "POST" | "PATCH" | "PUT" | "DELETE";
  /** Sent as JSON. */
  body?: unknown;
  signal?: AbortSignal;
}

/** Calls `/api/v1${path}`; resolves with the parsed JSON body (undefined for 204) or throws ApiError. */
export async function apiFetch<T>(path: string, options: ApiFetchOptions = {}): Promise<T> {
  const init: RequestInit = { method: options.method ?? "GET", signal: options.signal, credentials: "same-origin", headers: { accept: "application/json" } };
  if (options.body !== undefined) {
    init.body = JSON.stringify(options.body);
    init.headers = { ...init.headers, "content-type": "application/json" };
  }
  let response: Response;
  try {
    response = await fetch(`/api/v1${path}`, init);
  } catch (error) {
    if ((error as Error).name === "AbortError") throw error;
    throw new ApiError({ status: 0, code: "network", message: "The server could not be reached; check your connection and try again." });
  }
  if (response.status === 204) return undefined as T;
  const text = await response.text();
  let parsed: unknown = undefined;
  try {
    parsed = text ? JSON.parse(text) : undefined;
  } catch {
    parsed = undefined;
  }
  if (!response.ok) {
    if (isErrorBody(parsed)) throw new ApiError(parsed.error);
    throw new ApiError({ status: response.status, code: "http", message: `The server answered ${response.status} ${response.statusText}.` });
  }
  return parsed as T;
}

/** `/workspaces/{slug}` prefix, encoded once. */
export const workspacePath = (slug: string, rest = "") => `/workspaces/${encodeURIComponent(slug)}${rest}`;
