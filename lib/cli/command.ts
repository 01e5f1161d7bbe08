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

/** Terminal width a table's title is wrapped to (the definitions of the measures make some titles long). */
const TITLE_COLUMNS = 100;

/** Splits text into lines of at most `columns` characters at spaces (a longer word keeps its own line). */
function wrap(text: string, columns: number): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of text.split(" ")) {
    if (line && line.length + 1 + word.length > columns) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  return line ? [...lines, line] : lines;
}

/** Aligns label/value rows into a two-column table under a title wrapped to TITLE_COLUMNS and underlined. */
export function formatTable(rows: Array<[string, string | number]>, title?: string): string {
  const width = Math.max(0, ...rows.map(([label]) => label.length));
  const lines = rows.map(([label, value]) => `${label.padEnd(width)}  ${typeof value === "number" ? formatNumber(value) : value}`);
  if (!title) return lines.join("\n");
  const heading = wrap(title, TITLE_COLUMNS);
  return [...heading, "-".repeat(Math.max(...heading.map((l) => l.length), width + 12)), ...lines].join("\n");
}

export function formatNumber(value: number): string {
  if (Number.isInteger(value)) return String(value);
  const magnitude = Math.abs(value);
  if (magnitude !== 0 && (magnitude < 1e-4 || magnitude >= 1e9)) return value.toExponential(6);
  // Why only after a decimal point: an integer-valued text such as "12345680" (8 digits, 1e7..1e8)
  // lost its trailing zero and printed ten times too small.
  return value.toPrecision(8).replace(/(\.\d*?)0+$/, "$1").replace(/\.$/, "");
}
