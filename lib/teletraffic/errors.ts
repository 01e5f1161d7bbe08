import type { z } from "zod";

/** Out-of-domain input: the caller's fault (CLI exit 2, HTTP 400). */
export class TeletrafficInputError extends Error {
  readonly kind = "input" as const;
  readonly field: string;
  constructor(field: string, message: string) {
    super(message);
    this.name = "TeletrafficInputError";
    this.field = field;
  }
}

/** An iterative method stopped without meeting its tolerance; no result is returned. */
export class TeletrafficConvergenceError extends Error {
  readonly kind = "convergence" as const;
  readonly iterations: number;
  constructor(message: string, iterations: number) {
    super(message);
    this.name = "TeletrafficConvergenceError";
    this.iterations = iterations;
  }
}

/** Validates with a zod schema and turns the first issue into a TeletrafficInputError naming the field. */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const field = issue.path.length ? issue.path.map(String).join(".") : "input";
  throw new TeletrafficInputError(field, `${field}: ${issue.message}`);
}

export function inputError(field: string, message: string): TeletrafficInputError {
  return new TeletrafficInputError(field, `${field}: ${message}`);
}

/** Guards every public result: a NaN or infinity must never leave the library silently. */
export function assertFiniteResult<T extends object>(result: T, method: string): T {
  for (const [key, value] of Object.entries(result as Record<string, unknown>)) {
    if (typeof value === "number" && !Number.isFinite(value)) {
      throw new Error(`${method}: internal numerical failure, ${key} = ${value}`);
    }
  }
  return result;
}
