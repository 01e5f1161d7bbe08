import type { z } from "zod";

/** Numbers as the user would type them (no exponent noise for the usual bounds). */
function shown(value: unknown): string {
  if (typeof value === "bigint") return value.toString();
  if (typeof value === "number") {
    if (value === Number.MAX_SAFE_INTEGER) return "9007199254740991";
    return String(value);
  }
  return typeof value === "string" ? value : JSON.stringify(value);
}

function typeName(input: unknown): string {
  if (input === null) return "null";
  if (Array.isArray(input)) return "a list";
  if (typeof input === "string") return `"${input.length > 40 ? `${input.slice(0, 40)}…` : input}"`;
  if (typeof input === "object") return "an object";
  return String(input);
}

const expectedWords: Record<string, string> = {
  int: "must be a whole number",
  number: "must be a number",
  bigint: "must be a whole number",
  string: "must be text",
  boolean: "must be true or false",
  array: "must be a list (comma-separated, or a JSON array)",
  object: "must be a JSON object",
  tuple: "must be a list",
  record: "must be a JSON object",
  map: "must be a JSON object",
  nan: "must be NaN",
};

/**
 * Plain words for zod's default issue messages, keyed by issue code, for the command line ("expected int,
 * received number" → "must be a whole number"). Given to `safeParse(value, { error })`, so it only fills in
 * issues without a message of their own: a message written on the schema (`.gt(0, "must be > 0")`) or on a
 * refinement still wins. `requiredHint` is appended to the "required" of a missing value.
 */
export function plainIssueMap(requiredHint: string): z.core.$ZodErrorMap {
  return (issue) => {
    switch (issue.code) {
      case "invalid_type": {
        if (issue.input === undefined) return `required; ${requiredHint}`;
        const words = expectedWords[issue.expected] ?? `must be ${issue.expected}`;
        // "must be a whole number" needs no "(got 10.5)": the user just typed it.
        return issue.expected === "int" && typeof issue.input === "number" ? words : `${words} (got ${typeName(issue.input)})`;
      }
      case "too_small": {
        const { origin, minimum, inclusive } = issue;
        if (origin === "array" || origin === "set") return `needs at least ${shown(minimum)} ${Number(minimum) === 1 ? "entry" : "entries"}`;
        if (origin === "string") return `needs at least ${shown(minimum)} characters`;
        return inclusive ? `must be at least ${shown(minimum)}` : `must be greater than ${shown(minimum)}`;
      }
      case "too_big": {
        const { origin, maximum, inclusive } = issue;
        if (origin === "array" || origin === "set") return `takes at most ${shown(maximum)} ${Number(maximum) === 1 ? "entry" : "entries"}`;
        if (origin === "string") return `takes at most ${shown(maximum)} characters`;
        return inclusive ? `must be at most ${shown(maximum)}` : `must be less than ${shown(maximum)}`;
      }
      case "not_multiple_of":
        return `must be a multiple of ${shown(issue.divisor)}`;
      case "invalid_value":
        if (issue.input === undefined) return `required, ${issue.values.length === 1 ? shown(issue.values[0]) : `one of ${issue.values.map(shown).join(", ")}`}; ${requiredHint}`;
        return issue.values.length === 1 ? `must be ${shown(issue.values[0])}` : `must be one of ${issue.values.map(shown).join(", ")}`;
      case "invalid_union": {
        const { options, discriminator } = issue as { options?: unknown[]; discriminator?: string };
        if (Array.isArray(options) && options.length) {
          // A discriminated union reports on the discriminator's path with the whole object as input.
          const given = discriminator && issue.input && typeof issue.input === "object" ? (issue.input as Record<string, unknown>)[discriminator] : issue.input;
          const list = options.map(shown).join(", ");
          return given === undefined ? `required, one of ${list}; ${requiredHint}` : `must be one of ${list} (got ${typeName(given)})`;
        }
        if (issue.input === undefined) return `required; ${requiredHint}`;
        return `does not match any accepted form; ${requiredHint}`;
      }
      case "invalid_format":
        return `must be a valid ${issue.format}`;
      case "unrecognized_keys":
        return `unknown ${issue.keys.length === 1 ? "field" : "fields"} ${issue.keys.join(", ")}`;
      case "invalid_key":
        return "has an invalid key";
      case "invalid_element":
        return "has an invalid entry";
      default:
        return undefined;
    }
  };
}
