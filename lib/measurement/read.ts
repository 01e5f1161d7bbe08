import { CsvRowReader } from "./csv";
import { Utf8Decoder } from "./encoding";
import { MeasurementInputError } from "./errors";
import { columnMappingSchema, MAX_FILE_BYTES, PREVIEW_ROWS, type ColumnMapping, type ColumnMappingInput } from "./mapping";
import { RecordBuilder, type MeasuredData } from "./records";

export type ByteSource = Uint8Array | AsyncIterable<Uint8Array>;

/** Slices held bytes into chunks and lets other work run between them (browser and Node alike). */
async function* chunksOf(source: ByteSource, size = 256 * 1024): AsyncGenerator<Uint8Array> {
  if (!(source instanceof Uint8Array)) {
    yield* source;
    return;
  }
  for (let i = 0; i < source.length; i += size) {
    yield source.subarray(i, i + size);
    await new Promise((resolve) => setTimeout(resolve, 0));
  }
}

export interface ReadOptions {
  maxBytes?: number;
  /** called after each chunk with the bytes read so far */
  onProgress?: (bytesRead: number) => void;
}

/**
 * Reads a whole file against a mapping: UTF-8 check, CSV rows, cell validation, size limit, all
 * while the bytes stream in. Throws MeasurementInputError naming the line on the first problem.
 */
export async function readMeasurementCsv(source: ByteSource, mappingInput: ColumnMappingInput | ColumnMapping, options: ReadOptions = {}): Promise<MeasuredData> {
  const mapping = parseMapping(mappingInput);
  const builder = new RecordBuilder(mapping);
  const reader = new CsvRowReader((fields, line) => builder.row(fields, line), mapping.delimiter);
  const decoder = new Utf8Decoder(options.maxBytes ?? MAX_FILE_BYTES);
  for await (const chunk of chunksOf(source)) {
    reader.push(decoder.push(chunk));
    options.onProgress?.(decoder.bytes);
  }
  reader.push(decoder.end());
  reader.end();
  if (decoder.bytes === 0) throw new MeasurementInputError("empty-file", "the file is empty (0 bytes)");
  return builder.finish();
}

/** Validates a mapping with the concept's schema; the message names the field. */
export function parseMapping(input: unknown): ColumnMapping {
  const result = columnMappingSchema.safeParse(input);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const field = issue.path.map(String).join(".") || "mapping";
  throw new MeasurementInputError("bad-mapping", `mapping ${field}: ${issue.message}`, undefined, field);
}

export interface CsvPreview {
  header: string[];
  rows: string[][];
  /** line number of each preview row */
  lines: number[];
  delimiter: string;
  /** a mapping guessed from the header names, to start the mapping form from */
  guess: ColumnMappingInput | null;
}

/**
 * The header and first rows for the mapping step. Reads only as far as it needs; the encoding
 * and quoting checks apply to what it reads.
 */
export async function previewCsv(source: ByteSource, rows = PREVIEW_ROWS, maxBytes = MAX_FILE_BYTES): Promise<CsvPreview> {
  const out: { header: string[] | null; rows: string[][]; lines: number[] } = { header: null, rows: [], lines: [] };
  const reader = new CsvRowReader((fields, line) => {
    if (!out.header) out.header = fields.map((f) => f.trim());
    else {
      out.rows.push(fields);
      out.lines.push(line);
      if (out.rows.length >= rows) reader.stop();
    }
  });
  const decoder = new Utf8Decoder(maxBytes);
  for await (const chunk of chunksOf(source, 64 * 1024)) {
    reader.push(decoder.push(chunk));
    if (out.rows.length >= rows) break;
  }
  if (out.rows.length < rows) {
    reader.push(decoder.end());
    reader.end();
  }
  if (!out.header) throw new MeasurementInputError("empty-file", "the file is empty: no header line and no rows");
  return { header: out.header, rows: out.rows, lines: out.lines, delimiter: reader.delimiter ?? ",", guess: guessMapping(out.header) };
}

const HINTS: Record<string, RegExp> = {
  start: /^(start|start[ _-]?time|call[ _-]?start|begin|timestamp|time|seized|setup[ _-]?time)$/i,
  duration: /^(duration|holding[ _-]?time|hold|length|seconds|secs|call[ _-]?duration|conversation[ _-]?time)([ _-]?(\(?(s|sec|secs|seconds|ms|millis|milliseconds|min|mins|minutes)\)?))?$/i,
  outcome: /^(outcome|result|status|disposition|cause)$/i,
  group: /^(route|group|trunk[ _-]?group|trunk|queue|pool|circuit[ _-]?group)$/i,
  intervalStart: /^(interval|interval[ _-]?start|period|period[ _-]?start|slot)$/i,
  attempts: /^(attempts|call[ _-]?attempts|offered|bids|calls)$/i,
  carried: /^(carried|answered|completed|served)$/i,
};

/** The unit a duration column's name states ("duration_ms", "hold (min)"); none when it states none. */
function unitOf(column: string): "milliseconds" | "minutes" | undefined {
  const suffix = /[ _-]?\(?([a-z]+)\)?$/i.exec(column.trim())?.[1]?.toLowerCase() ?? "";
  if (["ms", "millis", "milliseconds"].includes(suffix)) return "milliseconds";
  if (["min", "mins", "minutes"].includes(suffix)) return "minutes";
  return undefined;
}

/** Guesses a mapping from header names; null when neither kind's required columns are found. */
export function guessMapping(header: string[]): ColumnMappingInput | null {
  const find = (field: string) => header.find((h) => HINTS[field].test(h.trim()));
  const interval = find("intervalStart");
  const attempts = find("attempts");
  if (interval && attempts) {
    const carried = find("carried");
    return { kind: "interval-counts", intervalStart: interval, attempts, ...(carried ? { carried } : {}), intervalMinutes: 15 };
  }
  const start = find("start");
  const duration = find("duration");
  if (!start || !duration) return null;
  const outcome = find("outcome");
  const group = find("group");
  const durationUnit = unitOf(duration);
  return { kind: "call-records", start, duration, ...(durationUnit ? { durationUnit } : {}), ...(outcome ? { outcome } : {}), ...(group ? { group } : {}) };
}
