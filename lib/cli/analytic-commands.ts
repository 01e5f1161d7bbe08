import { readFileSync } from "node:fs";
import { z } from "zod";
import { analyticOperations, type AnalyticOperationName } from "../teletraffic/operations";
import { CliUsageError, formatNumber, formatTable, type CliCommand, type CliOutput } from "./command";

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

const interarrivalFlags = { into: "interarrival", keys: ["law", "k", "mean", "scv", "probabilities", "means", "value", "cv", "shape", "scale", "min", "max", "samples"] };

/** Flags of renewal-loss (and renewal-queue, renewal-retrial) that describe the interarrival law, so `--law erlang --k 2 --mean 0.1` works. */
const nestedFlags: Partial<Record<AnalyticOperationName, { into: string; keys: string[] }>> = {
  "renewal-loss": interarrivalFlags,
  "renewal-queue": interarrivalFlags,
  "renewal-retrial": interarrivalFlags,
};

const numberPattern = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

function camelCase(flag: string): string {
  return flag.replace(/-([a-z0-9])/g, (_, c: string) => c.toUpperCase());
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

/** `--servers 30 --mean-holding 2 --interarrival.law erlang --input base.json` → { servers: 30, meanHolding: 2, ... } */
export function parseOperationFlags(name: AnalyticOperationName, argv: string[]): Record<string, unknown> {
  const input: Record<string, unknown> = {};
  const flags: Array<[string, string]> = [];
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
      let parsed: unknown;
      try {
        parsed = JSON.parse(readFileSync(value, "utf8"));
      } catch (error) {
        throw new CliUsageError(`--input ${value}: ${(error as Error).message}`);
      }
      if (typeof parsed !== "object" || parsed === null || Array.isArray(parsed)) throw new CliUsageError(`--input ${value}: must hold one JSON object`);
      Object.assign(input, (parsed as { input?: unknown }).input && typeof (parsed as { input?: unknown }).input === "object" ? (parsed as { input: object }).input : parsed);
      continue;
    }
    flags.push([flag, value]);
  }
  const nest = nestedFlags[name];
  const known = inputKeys(name);
  for (const [flag, value] of flags) {
    let path = flag.split(".").map(camelCase);
    if (nest && path.length === 1 && nest.keys.includes(path[0])) path = [nest.into, path[0]];
    // Why: the operation schemas strip unknown keys, so a misspelt optional flag (--mean-holdng 2)
    // was dropped silently and the default used, giving a wrong number with exit 0
    if (known && !known.has(path[0])) {
      throw new CliUsageError(`unknown flag --${flag} for ${name} (known: ${[...known].map((k) => `--${k.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`).join(", ")})`);
    }
    const asList = (listFlags[name] ?? []).includes(path.join("."));
    setPath(input, path, coerce(value, flag, asList));
  }
  return input;
}

/** Top-level input keys of an operation, from its JSON schema; undefined if they cannot be listed. */
function inputKeys(name: AnalyticOperationName): Set<string> | undefined {
  try {
    const json = z.toJSONSchema(analyticOperations[name].input, { io: "input", unrepresentable: "any" }) as { properties?: Record<string, unknown> };
    return json.properties ? new Set(Object.keys(json.properties)) : undefined;
  } catch {
    return undefined;
  }
}

function flatten(value: unknown, prefix: string, rows: Array<[string, string | number]>): void {
  if (typeof value === "number" || typeof value === "string") rows.push([prefix, value]);
  else if (typeof value === "boolean") rows.push([prefix, String(value)]);
  else if (Array.isArray(value) && value.every((v) => typeof v === "number")) rows.push([prefix, value.map((v) => formatNumber(v)).join(", ")]);
  else if (Array.isArray(value)) value.forEach((v, i) => flatten(v, `${prefix}[${i}]`, rows));
  else if (value && typeof value === "object") for (const [k, v] of Object.entries(value)) flatten(v, prefix ? `${prefix}.${k}` : k, rows);
}

function describeInput(name: string, schema: z.ZodType): CliOutput {
  let json: Record<string, unknown> = {};
  try {
    json = z.toJSONSchema(schema, { io: "input", unrepresentable: "any" }) as Record<string, unknown>;
  } catch {
    json = { description: schema.description };
  }
  const properties = (json.properties ?? {}) as Record<string, { description?: string }>;
  const rows: Array<[string, string]> = Object.entries(properties).map(([key, p]) => [
    `--${key.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`,
    p.description ?? "",
  ]);
  return { json, table: formatTable(rows, `${name}: ${schema.description ?? ""}`) };
}

function commandFor(name: AnalyticOperationName): CliCommand {
  const op = analyticOperations[name];
  return {
    name,
    summary: op.summary,
    run(argv: string[]): CliOutput {
      if (argv.includes("--help")) return describeInput(name, op.input);
      const result = op.evaluate(parseOperationFlags(name, argv));
      const rows: Array<[string, string | number]> = [];
      const { method, ...rest } = result;
      flatten(rest, "", rows);
      return { json: result, table: formatTable(rows, `${name}: ${String(method ?? "")}`) };
    },
  };
}

export const analyticCommands: CliCommand[] = (Object.keys(analyticOperations) as AnalyticOperationName[]).map(commandFor);
