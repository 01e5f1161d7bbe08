/** One sub-command of `npm run -s cli -- <name> ...`. */
export interface CliCommand {
  name: string;
  summary: string;
  /** Receives the arguments after the command name, `--json` already removed. */
  run(argv: string[]): Promise<CliOutput> | CliOutput;
}

export interface CliOutput {
  /** Printed as exactly one JSON object with `--json`. */
  json: Record<string, unknown>;
  /** Printed otherwise: a readable table. */
  table: string;
}

/** Bad flags or arguments: main prints the message on one line and exits 2. */
export class CliUsageError extends Error {
  readonly kind = "input" as const;
}

/** Errors whose `kind` is "input" are the caller's fault and exit with status 2. */
export function isInputError(error: unknown): error is Error {
  return error instanceof Error && (error as { kind?: unknown }).kind === "input";
}

/** Aligns label/value rows into a two-column table. */
export function formatTable(rows: Array<[string, string | number]>, title?: string): string {
  const width = Math.max(0, ...rows.map(([label]) => label.length));
  const lines = rows.map(([label, value]) => `${label.padEnd(width)}  ${typeof value === "number" ? formatNumber(value) : value}`);
  return (title ? [title, "-".repeat(Math.max(title.length, width + 12)), ...lines] : lines).join("\n");
}

export function formatNumber(value: number): string {
  if (Number.isInteger(value)) return String(value);
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude < 1e-4 || magnitude >= 1e9)) return value.toExponential(6);
  // Why only after a decimal point: an integer-valued text such as "12345680" (8 digits, 1e7..1e8)
  // lost its trailing zero and printed ten times too small.
  return value.toPrecision(8).replace(/(\.\d*?)0+$/, "$1").replace(/\.$/, "");
}
