/**
 * A file or mapping the user can fix: wrong columns, a bad cell, a wrong encoding. The message
 * names the line (1-based, the header is line 1) and the column where there is one, so the
 * upload route can answer 400 with it and the page can show it as written.
 */
export class MeasurementInputError extends Error {
  readonly kind = "input" as const;
  constructor(
    /** short stable code, e.g. "negative-duration", for tests and the API's error code */
    readonly code: MeasurementErrorCode,
    message: string,
    readonly line?: number,
    readonly column?: string,
  ) {
    super(message);
    this.name = "MeasurementInputError";
  }
}

export type MeasurementErrorCode =
  | "empty-file"
  | "file-too-large"
  | "wrong-encoding"
  | "missing-column"
  | "duplicate-column"
  | "wrong-field-count"
  | "unclosed-quote"
  | "not-a-number"
  | "negative-duration"
  | "bad-count"
  | "bad-timestamp"
  | "mixed-time-zones"
  | "unsorted"
  | "clock-change"
  | "duplicate-row"
  | "bad-outcome"
  | "too-many-groups"
  | "no-data"
  | "bad-mapping";

/** `line 12, column "duration": ...` */
export function cellError(code: MeasurementErrorCode, line: number, column: string | undefined, message: string): MeasurementInputError {
  const where = column === undefined ? `line ${line}` : `line ${line}, column "${column}"`;
  return new MeasurementInputError(code, `${where}: ${message}`, line, column);
}
