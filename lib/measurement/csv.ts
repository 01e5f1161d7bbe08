import Papa from "papaparse";
import { MeasurementInputError } from "./errors";

export type Delimiter = "," | ";" | "\t" | "|";
const DELIMITERS: Delimiter[] = [",", ";", "\t", "|"];

/**
 * Incremental CSV reader on papaparse's own parser (Papa.Parser, the engine behind Papa.parse's
 * streaming mode), fed text chunk by chunk so a large file never sits in memory as rows.
 * Each row comes with the number of the line it starts on (1-based); blank lines are skipped.
 * The delimiter is taken from the mapping or guessed from the header line; the line ending that
 * ends rows from the first one met. Lines are counted as an editor shows them: CRLF, a bare LF
 * and a bare CR each end one, so a quoted line break of another style than the file's counts too.
 */
export class CsvRowReader {
  private parser: InstanceType<typeof Papa.Parser> | null = null;
  private pending = "";
  private base = 0;
  private line = 1;
  private newline = "\n";
  /** text of the current parse() call and its absolute start index, read by the step callback */
  private current = "";
  private currentBase = 0;
  private lastCursor = 0;
  /** whether the text before the current row ended with CR (a CRLF cut between two rows is one break) */
  private endsWithCR = false;
  private stopped = false;
  delimiter: Delimiter | null;

  constructor(
    private readonly onRow: (fields: string[], line: number) => void,
    delimiter?: Delimiter,
  ) {
    this.delimiter = delimiter ?? null;
  }

  push(text: string): void {
    if (this.stopped) return;
    this.pending += text;
    if (!this.parser) {
      const firstBreak = this.pending.search(/[\r\n]/);
      if (firstBreak < 0) return; // wait for the whole header line
      this.start(firstBreak);
    }
    this.parse(true);
  }

  end(): void {
    if (this.stopped) return;
    if (!this.parser) {
      if (this.pending.trim() === "") return;
      this.start(this.pending.length);
    }
    this.parse(false);
  }

  /** Stops reading (e.g. after a preview's last row). */
  stop(): void {
    this.stopped = true;
  }

  private start(headerEnd: number): void {
    const nl = this.pending.indexOf("\n");
    const cr = this.pending.indexOf("\r");
    this.newline = cr >= 0 && (nl < 0 || cr < nl) ? (this.pending[cr + 1] === "\n" ? "\r\n" : "\r") : "\n";
    this.delimiter ??= guessDelimiter(this.pending.slice(0, headerEnd));
    this.parser = new Papa.Parser({
      delimiter: this.delimiter,
      newline: this.newline as "\n",
      step: (results: Papa.ParseStepResult<string[]>) => this.step(results),
    });
  }

  private parse(ignoreLastRow: boolean): void {
    this.current = this.pending;
    this.currentBase = this.base;
    const results = this.parser!.parse(this.pending, this.base, ignoreLastRow) as unknown as Papa.ParseResult<string[]>;
    if (this.stopped) return;
    const cursor = results.meta.cursor;
    this.pending = this.pending.slice(cursor - this.base);
    this.base = cursor;
  }

  private step(results: Papa.ParseStepResult<string[]>): void {
    if (this.stopped) return;
    const end = results.meta.cursor;
    const rowText = this.current.slice(this.lastCursor - this.currentBase, end - this.currentBase);
    const line = this.line;
    this.line += lineBreaks(rowText, this.endsWithCR);
    if (rowText.length > 0) this.endsWithCR = rowText.endsWith("\r");
    this.lastCursor = end;
    const quoteError = results.errors.find((e) => e.type === "Quotes");
    if (quoteError) throw new MeasurementInputError("unclosed-quote", `line ${line}: a quoted field is never closed (missing ")`, line);
    const fields = (results.data as unknown as string[][])[0];
    if (fields.length === 1 && fields[0].trim() === "") return;
    this.onRow(fields, line);
  }
}

/** Line breaks in `text`: CRLF, LF and CR each count once; an LF right after a CR that ended the text before is not counted again. */
export function lineBreaks(text: string, afterCR = false): number {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 13) n++;
    else if (c === 10 && !(i === 0 ? afterCR : text.charCodeAt(i - 1) === 13)) n++;
  }
  return n;
}

/** The candidate that splits the header line into the most fields (comma on a tie). */
export function guessDelimiter(headerLine: string): Delimiter {
  let best: Delimiter = ",";
  let bestCount = 0;
  for (const d of DELIMITERS) {
    const count = headerLine.split(d).length - 1;
    if (count > bestCount) [best, bestCount] = [d, count];
  }
  return best;
}
