import { readFileSync } from "node:fs";
import { z } from "zod";
import { analyticOperations, type AnalyticOperationName } from "../teletraffic/operations";
import { CliUsageError, formatNumber, formatTable, isInputError, type CliCommand, type CliOutput } from "./command";
import { plainIssueMap } from "./plain-issues";

/** Flags that always hold a list, even when given a single number. */
const listFlags: Partial<Record<AnalyticOperationName, string[]>> = {
  "mmpp-loss": ["rates"],
  "mmpp-queue": ["rates"],
  "renewal-loss": ["interarrival.probabilities", "interarrival.means", "interarrival.samples"],
  "batch-loss": ["batchSize.values", "batchSize.probabilities"],
  "mmpp-retrial": ["rates"],
  "batch-retrial": ["batchSize.values", "batchSize.probabilities"],
  "renewal-queue": ["interarrival.probabilities", "interarrival.means", "interarrival.samples"],
  "renewal-retrial": ["interarrival.probabilities", "interarrival.means", "interarrival.samples"],
};

/**
 * Commands whose interarrival law may also be given one field per flag (`--law erlang --k 2 --mean 0.1`
 * for `--interarrival.law erlang --interarrival.k 2 ...`). The field names come from the law schema itself.
 */
const nestedInto: Partial<Record<AnalyticOperationName, string>> = {
  "renewal-loss": "interarrival",
  "renewal-queue": "interarrival",
  "renewal-retrial": "interarrival",
};

const numberPattern = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

function camelCase(flag: string): string {
  return flag.replace(/-([a-z0-9])/g, (_, c: string) => c.toUpperCase());
}

function kebabCase(key: string): string {
  return key.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);
}

function helpHint(name: string): string {
  return `see "npm run -s cli -- ${name} --help"`;
}

type JsonSchema = {
  type?: string;
  description?: string;
  properties?: Record<string, JsonSchema>;
  required?: string[];
  oneOf?: JsonSchema[];
  anyOf?: JsonSchema[];
  items?: JsonSchema;
  const?: unknown;
  enum?: unknown[];
  default?: unknown;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  minItems?: number;
  maxItems?: number;
};

const jsonSchemas = new Map<AnalyticOperationName, JsonSchema | undefined>();

/** The operation's input as JSON schema (what --help --json prints); undefined if it cannot be written. */
function inputJsonSchema(name: AnalyticOperationName): JsonSchema | undefined {
  if (!jsonSchemas.has(name)) {
    try {
      jsonSchemas.set(name, z.toJSONSchema(analyticOperations[name].input, { io: "input", unrepresentable: "any" }) as JsonSchema);
    } catch {
      jsonSchemas.set(name, undefined);
    }
  }
  return jsonSchemas.get(name);
}

/** Top-level input keys of an operation, from its JSON schema; undefined if they cannot be listed. */
function inputKeys(name: AnalyticOperationName): Set<string> | undefined {
  const json = inputJsonSchema(name);
  return json?.properties ? new Set(Object.keys(json.properties)) : undefined;
}

/** The alternatives of a union node, and the field whose constant tells them apart ("law"), if any. */
function variantsOf(node: JsonSchema | undefined): { discriminator: string; variants: JsonSchema[] } | undefined {
  const variants = node?.oneOf ?? node?.anyOf;
  if (!variants?.length || !variants.every((v) => v.properties)) return undefined;
  const discriminator = Object.keys(variants[0].properties!).find((key) => variants.every((v) => v.properties![key]?.const !== undefined));
  return discriminator ? { discriminator, variants } : undefined;
}

/** The law's field flags (`--k`, `--mean` ...) a command accepts on their own; none for most commands. */
function shortcutKeys(name: AnalyticOperationName): { into: string; keys: Set<string> } | undefined {
  const into = nestedInto[name];
  const json = inputJsonSchema(name);
  const union = variantsOf(json?.properties?.[into ?? ""]);
  if (!into || !union) return undefined;
  const keys = new Set(union.variants.flatMap((v) => Object.keys(v.properties!)));
  for (const key of Object.keys(json!.properties!)) keys.delete(key);
  return { into, keys };
}

/** The flag that sets an input path: `--mean-holding`, `--batch-size.law`, or the shortcut `--mean`. */
function flagForPath(name: AnalyticOperationName, path: string[]): string {
  const nest = shortcutKeys(name);
  if (nest && path.length === 2 && path[0] === nest.into && nest.keys.has(path[1])) return `--${kebabCase(path[1])}`;
  return `--${path.map(kebabCase).join(".")}`;
}

function coerce(raw: string, flag: string, asList: boolean): unknown {
  const text = raw.trim();
  if (text.startsWith("[") || text.startsWith("{")) {
    try {
      return JSON.parse(text);
    } catch {
      throw new CliUsageError(`--${flag}: not valid JSON: ${text}`);
    }
  }
  if (asList || (text.includes(",") && text.split(",").every((part) => numberPattern.test(part.trim())))) {
    return text.split(",").map((part) => (numberPattern.test(part.trim()) ? Number(part) : part.trim()));
  }
  if (numberPattern.test(text)) return Number(text);
  if (text === "true" || text === "false") return text === "true";
  return text;
}

function setPath(target: Record<string, unknown>, path: string[], value: unknown): void {
  let node = target;
  for (const key of path.slice(0, -1)) {
    if (typeof node[key] !== "object" || node[key] === null) node[key] = {};
    node = node[key] as Record<string, unknown>;
  }
  node[path[path.length - 1]] = value;
}

/** Every input path a value sets: itself, or the leaves of a JSON object given to one flag. */
function leafPaths(path: string[], value: unknown): string[][] {
  if (!value || typeof value !== "object" || Array.isArray(value) || Object.keys(value).length === 0) return [path];
  return Object.entries(value).flatMap(([key, v]) => leafPaths([...path, key], v));
}

/** Where each part of the input came from, so an error can name what the user wrote. */
export interface InputOrigins {
  /** Input path ("interarrival.mean") → the flag as typed ("--mean"). */
  flags: Map<string, string>;
  /** Top-level key → the --input file that gave it (and no flag replaced it whole). */
  files: Map<string, string>;
}

/**
 * `--servers 30 --mean-holding 2 --interarrival.law erlang --input base.json` → { servers: 30, meanHolding: 2, ... }.
 * Each flag at most once; flags override what an --input file gives, wherever they stand.
 */
export function parseOperationArgs(name: AnalyticOperationName, argv: string[]): { input: Record<string, unknown>; origins: InputOrigins } {
  const input: Record<string, unknown> = {};
  const origins: InputOrigins = { flags: new Map(), files: new Map() };
  const flags: Array<[string, string]> = [];
  let inputFile: string | undefined;
  for (let i = 0; i < argv.length; i++) {
    const token = argv[i];
    if (!token.startsWith("--") || token === "--") throw new CliUsageError(`unexpected argument "${token}" (flags look like --servers 30)`);
    let flag = token.slice(2);
    let value: string | undefined;
    const eq = flag.indexOf("=");
    if (eq >= 0) {
      value = flag.slice(eq + 1);
      flag = flag.slice(0, eq);
    } else {
      const next = argv[i + 1];
      if (next === undefined || (next.startsWith("--") && !numberPattern.test(next))) throw new CliUsageError(`--${flag} needs a value`);
      value = next;
      i++;
    }
    if (flag === "input") {
      if (inputFile !== undefined) throw new CliUsageError(`--input given twice (${inputFile}, ${value}); give one file and override its values with flags`);
      inputFile = value;
      let parsed: unknown;
      try {
        parsed = JSON.parse(readFileSync(value, "utf8"));
      } catch (error) {
        throw new CliUsageError(`--input ${value}: ${(error as Error).message}`);
      }
      if (typeof parsed !== "object" || parsed === null || Array.isArray(parsed)) throw new CliUsageError(`--input ${value}: must hold one JSON object`);
      const wrapped = (parsed as { input?: unknown }).input;
      const fields = wrapped && typeof wrapped === "object" && !Array.isArray(wrapped) ? (wrapped as Record<string, unknown>) : (parsed as Record<string, unknown>);
      Object.assign(input, fields);
      for (const key of Object.keys(fields)) origins.files.set(key, value);
      continue;
    }
    flags.push([flag, value]);
  }
  const nest = shortcutKeys(name);
  const known = inputKeys(name);
  const parsedFlags = flags.map(([flag, value]) => {
    let path = flag.split(".").map(camelCase);
    if (nest && path.length === 1 && nest.keys.has(path[0])) path = [nest.into, path[0]];
    // Why: the operation schemas strip unknown keys, so a misspelt optional flag (--mean-holdng 2)
    // was dropped silently and the default used, giving a wrong number with exit 0
    if (known && !known.has(path[0])) {
      throw new CliUsageError(`unknown flag --${flag} for ${name} (known: ${[...known].map((k) => `--${kebabCase(k)}`).join(", ")})`);
    }
    const asList = (listFlags[name] ?? []).includes(path.join("."));
    return { flag: `--${flag}`, path, value: coerce(value, flag, asList) };
  });
  // A whole object (--interarrival '{...}') before the flags that set its fields, so the order on the line does not matter.
  parsedFlags.sort((a, b) => a.path.length - b.path.length);
  for (const { flag, path, value } of parsedFlags) {
    // Why: a repeated flag silently kept the last value (erlang-b --servers 30 --servers 40 computed N = 40).
    for (const leaf of leafPaths(path, value)) {
      const key = leaf.join(".");
      const before = origins.flags.get(key) ?? [...origins.flags].find(([other]) => other.startsWith(`${key}.`) || key.startsWith(`${other}.`))?.[1];
      if (before === flag) throw new CliUsageError(`${flag} given twice; give each flag once`);
      if (before !== undefined) throw new CliUsageError(`${before} and ${flag} both set ${key}; give it once`);
    }
    for (const leaf of leafPaths(path, value)) origins.flags.set(leaf.join("."), flag);
    if (path.length === 1) origins.files.delete(path[0]);
    setPath(input, path, value);
  }
  return { input, origins };
}

/** `--servers 30 --mean-holding 2 --interarrival.law erlang --input base.json` → { servers: 30, meanHolding: 2, ... } */
export function parseOperationFlags(name: AnalyticOperationName, argv: string[]): Record<string, unknown> {
  return parseOperationArgs(name, argv).input;
}

/** "interarrival.k", "rates[1]": a field as written in the JSON file. */
function jsonField(path: PropertyKey[]): string {
  return path.map((key, i) => (typeof key === "number" ? `[${key}]` : `${i ? "." : ""}${String(key)}`)).join("");
}

/** " (entry 2)", " (field k)": the part of one flag's value an issue is about. */
function within(rest: PropertyKey[]): string {
  return rest.length ? ` (${rest.map((key) => (typeof key === "number" ? `entry ${key + 1}` : `field ${String(key)}`)).join(", ")})` : "";
}

/**
 * What to call an input path in an error: the flag the user typed (`--mean-holding`, `--rates (entry 2)`),
 * the JSON field of the --input file that gave it, or, for a value given nowhere, the flag that would give it.
 * Undefined when the path is not a field at all (an issue about the input as a whole).
 */
export function labelFor(name: AnalyticOperationName, path: PropertyKey[], origins: InputOrigins): string | undefined {
  for (let i = path.length; i > 0; i--) {
    const flag = origins.flags.get(path.slice(0, i).map(String).join("."));
    if (flag) return `${flag}${within(path.slice(i))}`;
  }
  if (!path.length) return undefined;
  const file = origins.files.get(String(path[0]));
  if (file !== undefined) return `${jsonField(path)} in ${file}`;
  if (!inputKeys(name)?.has(String(path[0]))) return undefined;
  const key = path.map(String).join(".");
  const under = [...new Set([...origins.flags].filter(([other]) => other.startsWith(`${key}.`)).map(([, flag]) => flag))];
  if (under.length) return under.join(", ");
  const fields = path.findIndex((p) => typeof p === "number");
  const named = fields < 0 ? path : path.slice(0, fields);
  return `${flagForPath(name, named.map(String))}${within(path.slice(named.length))}`;
}

/** Internal camelCase field names in a message (refinements write "needs waitingPositions > 0") as their flags. */
function withFlagNames(name: AnalyticOperationName, message: string): string {
  const keys = [...(inputKeys(name) ?? [])].filter((key) => /[A-Z]/.test(key));
  if (!keys.length) return message;
  return message.replace(new RegExp(`\\b(${keys.join("|")})\\b`, "g"), (key) => flagForPath(name, [key]));
}

function problemLine(name: AnalyticOperationName, path: PropertyKey[], message: string, origins: InputOrigins): string {
  const label = labelFor(name, path, origins);
  const fromFile = label !== undefined && !label.startsWith("--");
  const text = fromFile ? message : withFlagNames(name, message);
  return label ? `${label}: ${text}` : text;
}

/** One line per problem, each naming the flag (or --input field) it is about. */
export function describeIssues(name: AnalyticOperationName, issues: z.core.$ZodIssue[], origins: InputOrigins): string[] {
  const lines = issues.flatMap((issue) => {
    if (issue.code === "unrecognized_keys") {
      return issue.keys.map((key) => problemLine(name, [...issue.path, key], `not accepted here; ${helpHint(name)}`, origins));
    }
    return [problemLine(name, issue.path, issue.message, origins)];
  });
  return [...new Set(lines)];
}

/** Validates as the operation will, but reports every problem in the words of the command line. */
function checkInput(name: AnalyticOperationName, input: Record<string, unknown>, origins: InputOrigins): void {
  const result = analyticOperations[name].input.safeParse(input, { error: plainIssueMap(helpHint(name)) });
  if (!result.success) throw new CliUsageError(describeIssues(name, result.error.issues, origins).join("\n"));
}

/** An input error the operation raised after the schema (a cross-field rule), relabelled with the flag. */
function relabel(name: AnalyticOperationName, error: unknown, origins: InputOrigins): unknown {
  if (!isInputError(error)) return error;
  const field = (error as { field?: unknown }).field;
  if (typeof field !== "string") return error;
  const message = error.message.startsWith(`${field}: `) ? error.message.slice(field.length + 2) : error.message;
  return new CliUsageError(problemLine(name, field.split("."), message, origins));
}

function flatten(value: unknown, prefix: string, rows: Array<[string, string | number]>): void {
  if (typeof value === "number" || typeof value === "string") rows.push([prefix, value]);
  else if (typeof value === "boolean") rows.push([prefix, String(value)]);
  else if (Array.isArray(value) && value.every((v) => typeof v === "number")) rows.push([prefix, value.map((v) => formatNumber(v)).join(", ")]);
  else if (Array.isArray(value)) value.forEach((v, i) => flatten(v, `${prefix}[${i}]`, rows));
  else if (value && typeof value === "object") for (const [k, v] of Object.entries(value)) flatten(v, prefix ? `${prefix}.${k}` : k, rows);
}

/** "number > 0", "whole number 1 to 100000", "list of numbers 0 to 1, 2 to 16 entries": a field's type and bounds. */
function fieldText(node: JsonSchema): string {
  if (node.const !== undefined) return JSON.stringify(node.const);
  if (node.enum) return `one of ${node.enum.map((v) => String(v)).join(", ")}`;
  const variants = variantsOf(node);
  if (variants) return `one of ${variants.variants.map((v) => String(v.properties![variants.discriminator].const)).join(", ")}`;
  if (node.type === "array") {
    const count =
      node.minItems !== undefined && node.maxItems !== undefined
        ? `${node.minItems} to ${node.maxItems} entries`
        : node.minItems !== undefined
          ? `at least ${node.minItems} ${node.minItems === 1 ? "entry" : "entries"}`
          : node.maxItems !== undefined
            ? `at most ${node.maxItems} entries`
            : "";
    const items = node.items ? fieldText(node.items).replace(/^whole number/, "whole numbers").replace(/^number/, "numbers") : "values";
    return [`list of ${items}`, count].filter(Boolean).join(", ");
  }
  const type = node.type === "integer" ? "whole number" : node.type === "number" ? "number" : node.type === "boolean" ? "true or false" : node.type === "string" ? "text" : node.type === "object" ? "JSON object" : "value";
  if (node.minimum !== undefined && node.maximum !== undefined) return `${type} ${node.minimum} to ${node.maximum}`;
  const bounds = [
    node.minimum !== undefined ? `>= ${node.minimum}` : node.exclusiveMinimum !== undefined ? `> ${node.exclusiveMinimum}` : "",
    node.maximum !== undefined ? `<= ${node.maximum}` : node.exclusiveMaximum !== undefined ? `< ${node.exclusiveMaximum}` : "",
  ].filter(Boolean);
  return bounds.length ? `${type} ${bounds.join(" and ")}` : type;
}

/**
 * One row per alternative of a law (or any union told apart by a constant field): the flag that picks it and the
 * fields it takes, written from the schema's own JSON form so the help follows the law schema.
 */
function variantRows(name: AnalyticOperationName, node: JsonSchema, path: string[], indent: string, rows: Array<[string, string]>): void {
  const union = variantsOf(node);
  if (!union) return;
  for (const variant of union.variants) {
    const properties = variant.properties!;
    const required = new Set(variant.required ?? []);
    const nested: Array<[string, JsonSchema]> = [];
    const fields: string[] = [];
    for (const [key, field] of Object.entries(properties)) {
      if (key === union.discriminator) continue;
      if (variantsOf(field)) nested.push([key, field]);
      else fields.push(`${flagForPath(name, [...path, key])} (${fieldText(field)}${required.has(key) ? "" : ", optional"})`);
    }
    rows.push([`${indent}${flagForPath(name, [...path, union.discriminator])} ${String(properties[union.discriminator].const)}`, fields.join(", ")]);
    for (const [key, field] of nested) variantRows(name, field, [...path, key], `${indent}  `, rows);
  }
}

function describeInput(name: AnalyticOperationName, schema: z.ZodType): CliOutput {
  const json: Record<string, unknown> = (inputJsonSchema(name) as Record<string, unknown> | undefined) ?? { description: schema.description };
  const properties = (json.properties ?? {}) as Record<string, JsonSchema>;
  const rows: Array<[string, string]> = [];
  for (const [key, property] of Object.entries(properties)) {
    const union = variantsOf(property);
    if (!union) {
      rows.push([`--${kebabCase(key)}`, withFlagNames(name, property.description ?? "")]);
      continue;
    }
    const nest = shortcutKeys(name)?.into === key;
    const how = nest ? "give --law and the law's fields as flags" : `give a JSON object or one flag per field`;
    rows.push([`--${kebabCase(key)}`, `${withFlagNames(name, property.description ?? "")}; ${how}, one of:`]);
    variantRows(name, property, [key], "  ", rows);
  }
  rows.push(["--input FILE", "a JSON object with these fields by their JSON names (as in --help --json); a flag given as well overrides the file's value"]);
  rows.push(["", "each flag at most once"]);
  return { json, table: formatTable(rows, `${name}: ${schema.description ?? ""}`) };
}

function commandFor(name: AnalyticOperationName): CliCommand {
  const op = analyticOperations[name];
  return {
    name,
    summary: op.summary,
    run(argv: string[]): CliOutput {
      if (argv.includes("--help")) return describeInput(name, op.input);
      const { input, origins } = parseOperationArgs(name, argv);
      checkInput(name, input, origins);
      let result: Record<string, unknown>;
      try {
        result = op.evaluate(input);
      } catch (error) {
        throw relabel(name, error, origins);
      }
      const rows: Array<[string, string | number]> = [];
      const { method, ...rest } = result;
      flatten(rest, "", rows);
      return { json: result, table: formatTable(rows, `${name}: ${String(method ?? "")}`) };
    },
  };
}

export const analyticCommands: CliCommand[] = (Object.keys(analyticOperations) as AnalyticOperationName[]).map(commandFor);
