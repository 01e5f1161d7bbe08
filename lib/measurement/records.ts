import { cellError, MeasurementInputError } from "./errors";
import { mappedColumns, MAX_GROUPS, OUTCOMES, parseUtcOffset, type CallRecordMapping, type ColumnMapping, type IntervalCountMapping, type Outcome } from "./mapping";
import { parseTimestamp, formatLocal, type ParsedTimestamp } from "./timestamps";

/** Call records, sorted by start, in columnar arrays. */
export interface CallRecordSet {
  kind: "call-records";
  count: number;
  /** start instants, ms since the epoch */
  start: Float64Array;
  /** UTC offset (minutes) of each record's wall clock */
  offset: Int16Array;
  /** holding time in seconds (0 for attempts that never held a circuit) */
  duration: Float64Array;
  /** index into OUTCOMES; "answered" when the file has no outcome column */
  outcome: Uint8Array;
  /** index into groups; 0 when the file has no group column */
  group: Uint16Array;
  groups: string[];
  hasOutcome: boolean;
  hasGroup: boolean;
  /** the distinct UTC offsets met, in order */
  offsets: number[];
  /** what the reader accepted but the user should know (e.g. rows repeating an earlier row), as sentences */
  notes?: string[];
}

/** Per-interval counts, sorted by interval start. */
export interface IntervalCountSet {
  kind: "interval-counts";
  count: number;
  start: Float64Array;
  offset: Int16Array;
  attempts: Float64Array;
  /** null when the file has no carried column */
  carried: Float64Array | null;
  intervalMinutes: number;
  meanHoldingSeconds: number | null;
  offsets: number[];
  notes?: string[];
}

export type MeasuredData = CallRecordSet | IntervalCountSet;

const DURATION_FACTOR = { seconds: 1, minutes: 60, milliseconds: 0.001 } as const;
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const CLOCK_DURATION = /^(?:(\d+):)?(\d{1,2}):(\d{2}(?:\.\d+)?)$/;

const NON_FINITE = /^[+-]?(inf|infinity|nan)$/i;
/** "120,5", "1.234,5", "1,500": a comma between digits, read neither as a decimal mark nor as a thousands separator */
const COMMA_NUMBER = /^[+-]?[\d.]*\d,\d+$/;

/**
 * A plain decimal number (optional sign, point, exponent), finite. A comma between digits is
 * refused with a hint rather than read: "1,500" may be 1.5 or 1500, and a wrong guess would
 * change a value a thousandfold without a word (as day-first dates are refused, not guessed).
 */
function parseNumber(text: string, line: number, column: string): number {
  if (text === "") throw cellError("not-a-number", line, column, "is empty; a number is needed");
  if (NUMBER.test(text)) {
    const n = Number(text);
    if (!Number.isFinite(n)) throw cellError("not-a-number", line, column, `"${text}" is not a finite number (too large)`);
    return n;
  }
  if (NON_FINITE.test(text)) throw cellError("not-a-number", line, column, `"${text}" is not a finite number`);
  if (COMMA_NUMBER.test(text)) {
    const example = text.includes(".") ? "" : ` (${text.replace(",", ".")})`;
    throw cellError(
      "not-a-number",
      line,
      column,
      `"${text}" is not a number: a comma is read neither as a decimal mark nor as a thousands separator; write numbers with a decimal point${example} and no thousands separators`,
    );
  }
  throw cellError("not-a-number", line, column, `"${text}" is not a number`);
}

/** Whether the digits before any exponent are all zero ("-0", "-0.00", "-0e3"), so a minus sign means nothing. */
const isZeroText = (text: string) => !/[1-9]/.test(text.replace(/[eE].*$/, ""));

/** Clocks go back at most an hour (30 minutes on Lord Howe Island), between 23:00 and 04:00 local time wherever daylight saving ends. */
const NIGHT_FROM = 23 * 60;
const NIGHT_TO = 4 * 60;

/**
 * Whether a start earlier than the previous row's in a file without UTC offsets is likely the end
 * of daylight saving rather than a sorting error: the step back is at most one hour (the clock
 * repeats one hour, so consecutive calls step back by an hour less the time between them) and
 * both wall-clock times lie between 23:00 and 04:00 (where the clock changes: 24:00, 01:00, 02:00
 * or 03:00 local). `offsetMinutes` is the fixed offset the file's times were read with.
 */
export function looksLikeClocksGoingBack(previousMs: number, currentMs: number, offsetMinutes: number): boolean {
  const back = previousMs - currentMs;
  if (back <= 0 || back > 3_600_000) return false;
  const night = (ms: number) => {
    const minute = (((ms / 60_000 + offsetMinutes) % 1440) + 1440) % 1440;
    return minute >= NIGHT_FROM || minute < NIGHT_TO;
  };
  return night(previousMs) && night(currentMs);
}

/** Growable Float64Array-backed column. */
class Column<T extends Float64Array | Int16Array | Uint8Array | Uint16Array> {
  length = 0;
  constructor(
    private data: T,
    private readonly make: (n: number) => T,
  ) {}
  push(v: number): void {
    if (this.length === this.data.length) {
      const bigger = this.make(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = v;
  }
  finish(): T {
    return this.data.subarray(0, this.length) as T;
  }
}
const f64 = () => new Column(new Float64Array(1024), (n) => new Float64Array(n));

/**
 * Checks the header and every row of one file against a mapping, building the columns as it
 * goes. Rows arrive in file order from CsvRowReader; the first error throws with its line.
 */
export class RecordBuilder {
  private indices: Record<string, number> | null = null;
  private header: string[] = [];
  private readonly defaultOffset: number;
  private firstExplicit: { explicit: boolean; line: number } | null = null;
  private readonly offsets: number[] = [];
  private offsetLines: number[] = [];
  private previous: { epochMs: number; line: number; text: string } | null = null;
  /** call records repeating an earlier row at the same start, and the first such pair */
  private repeats = 0;
  private firstRepeat: { line: number; of: number } | null = null;
  /** rows sharing the previous start instant: key → line, to find exact repeats */
  private sameStart = new Map<string, number>();
  private readonly start = f64();
  private readonly offset = new Column(new Int16Array(1024), (n) => new Int16Array(n));
  private readonly values = f64();
  private readonly second = f64();
  private readonly outcome = new Column(new Uint8Array(1024), (n) => new Uint8Array(n));
  private readonly group = new Column(new Uint16Array(1024), (n) => new Uint16Array(n));
  private readonly groupIndex = new Map<string, number>();
  rows = 0;

  constructor(readonly mapping: ColumnMapping) {
    this.defaultOffset = parseUtcOffset(mapping.timeZone);
  }

  /** Feeds one row (the first is the header). */
  row(fields: string[], line: number): void {
    if (!this.indices) return this.readHeader(fields, line);
    if (fields.length !== this.header.length)
      throw new MeasurementInputError("wrong-field-count", `line ${line}: has ${fields.length} field${fields.length === 1 ? "" : "s"}, the header has ${this.header.length}`, line);
    this.rows++;
    if (this.mapping.kind === "call-records") this.callRecord(this.mapping, fields, line);
    else this.intervalCount(this.mapping, fields, line);
  }

  private readHeader(fields: string[], line: number): void {
    this.header = fields.map((f) => f.trim());
    const seen = new Map<string, number>();
    this.header.forEach((name, i) => {
      const key = name.toLowerCase();
      if (seen.has(key) && mappedColumns(this.mapping).some((c) => c.column.trim().toLowerCase() === key))
        throw new MeasurementInputError("duplicate-column", `line ${line}: the header names the column "${name}" twice`, line, name);
      seen.set(key, i);
    });
    const indices: Record<string, number> = {};
    for (const { field, column } of mappedColumns(this.mapping)) {
      const i = seen.get(column.trim().toLowerCase());
      if (i === undefined)
        throw new MeasurementInputError(
          "missing-column",
          `line ${line}: the header has no column "${column}" (mapped to ${field}); it has ${this.header.map((h) => `"${h}"`).join(", ")}`,
          line,
          column,
        );
      indices[field] = i;
    }
    this.indices = indices;
  }

  private cell(fields: string[], field: string): string {
    return fields[this.indices![field]].trim();
  }

  private columnName(field: string): string {
    return this.header[this.indices![field]];
  }

  private timestamp(fields: string[], field: string, line: number): ParsedTimestamp {
    const text = this.cell(fields, field);
    const column = this.columnName(field);
    if (text === "") throw cellError("bad-timestamp", line, column, "is empty");
    const t = parseTimestamp(text, this.defaultOffset);
    if (typeof t === "string") throw cellError("bad-timestamp", line, column, t);
    this.checkZone(t, line, column);
    if (this.previous) {
      if (t.epochMs < this.previous.epochMs) {
        const earlier = `${text} is earlier than ${this.previous.text} on line ${this.previous.line}`;
        if (!t.explicit && looksLikeClocksGoingBack(this.previous.epochMs, t.epochMs, t.offsetMinutes))
          throw cellError(
            "clock-change",
            line,
            column,
            `${earlier}: a step back of at most an hour at night looks like the clocks going back at the end of daylight saving, which times without a UTC offset cannot show; export the ${column} times with their UTC offset (such as +01:00) or in UTC (Z). If the file is only out of order, sort it by ${column}`,
          );
        throw cellError("unsorted", line, column, `${earlier}; sort the file by ${column}`);
      }
      if (t.epochMs > this.previous.epochMs) this.sameStart.clear();
    }
    this.previous = { epochMs: t.epochMs, line, text };
    return t;
  }

  /**
   * Mixed time zones: some cells with an offset and some without, or offsets that cannot be one
   * clock (more than two, or two that are not one hour apart as at a daylight-saving change).
   */
  private checkZone(t: ParsedTimestamp, line: number, column: string): void {
    if (!this.firstExplicit) this.firstExplicit = { explicit: t.explicit, line };
    else if (this.firstExplicit.explicit !== t.explicit)
      throw cellError(
        "mixed-time-zones",
        line,
        column,
        `mixed time zones: this timestamp ${t.explicit ? "has" : "has no"} UTC offset but the one on line ${this.firstExplicit.line} ${t.explicit ? "has none" : "has one"}`,
      );
    if (this.offsets.includes(t.offsetMinutes)) return;
    const clash = this.offsets.length >= 2 || (this.offsets.length === 1 && Math.abs(this.offsets[0] - t.offsetMinutes) !== 60);
    if (clash)
      throw cellError(
        "mixed-time-zones",
        line,
        column,
        `mixed time zones: offset ${formatLocal(0, t.offsetMinutes).slice(19)} after ${this.offsets.map((o, i) => `${formatLocal(0, o).slice(19)} (line ${this.offsetLines[i]})`).join(" and ")}; one file must use one clock (a single daylight-saving change is allowed)`,
      );
    this.offsets.push(t.offsetMinutes);
    this.offsetLines.push(line);
  }

  private number(fields: string[], field: string, line: number): number {
    return parseNumber(this.cell(fields, field), line, this.columnName(field));
  }

  /**
   * A call record with the same start and the same values in every mapped column as an earlier
   * one is kept: with whole-second times, distinct calls at busy-hour rates share a start and a
   * holding time quite often (at 2 400 calls/h, tens a day). They are counted for a note.
   */
  private repeatCheck(key: string, line: number): void {
    const first = this.sameStart.get(key);
    if (first === undefined) this.sameStart.set(key, line);
    else {
      this.repeats++;
      this.firstRepeat ??= { line, of: first };
    }
  }

  private readNotes(): string[] {
    if (!this.firstRepeat) return [];
    const n = this.repeats;
    const share = (100 * n) / this.rows;
    return [
      `${n} row${n === 1 ? " repeats" : "s repeat"} an earlier row with the same start in every mapped column (${share < 0.1 ? "under 0.1" : share.toPrecision(2)} % of the rows; the first is line ${this.firstRepeat.line}, repeating line ${this.firstRepeat.of}). ` +
        "They are kept as separate calls, since with times in whole seconds distinct calls often share a start and a holding time. " +
        "If the export really wrote some calls twice, remove the repeated rows and upload the file again.",
    ];
  }

  private callRecord(m: CallRecordMapping, fields: string[], line: number): void {
    const t = this.timestamp(fields, "start", line);
    let outcome = 0;
    if (m.outcome !== undefined) {
      const text = this.cell(fields, "outcome").toLowerCase();
      outcome = OUTCOMES.indexOf(text as Outcome);
      if (outcome < 0) throw cellError("bad-outcome", line, this.columnName("outcome"), `"${this.cell(fields, "outcome")}" is not one of ${OUTCOMES.join(", ")}`);
    }
    const durationText = this.cell(fields, "duration");
    let seconds: number;
    if (durationText === "" && outcome !== 0) seconds = 0; // blocked or abandoned: no holding time
    else seconds = this.duration(durationText, m.durationUnit, line);
    let group = 0;
    if (m.group !== undefined) {
      const name = this.cell(fields, "group");
      let g = this.groupIndex.get(name);
      if (g === undefined) {
        if (this.groupIndex.size >= MAX_GROUPS)
          throw cellError("too-many-groups", line, this.columnName("group"), `more than ${MAX_GROUPS} different groups; is this the right column?`);
        g = this.groupIndex.size;
        this.groupIndex.set(name, g);
      }
      group = g;
    }
    this.repeatCheck(`${seconds}\u0000${outcome}\u0000${group}`, line);
    this.start.push(t.epochMs);
    this.offset.push(t.offsetMinutes);
    this.values.push(seconds);
    this.outcome.push(outcome);
    this.group.push(group);
  }

  private duration(text: string, unit: CallRecordMapping["durationUnit"], line: number): number {
    const column = this.columnName("duration");
    const minus = text.startsWith("-");
    const clock = CLOCK_DURATION.exec(minus ? text.slice(1) : text);
    let seconds: number;
    if (clock) seconds = Number(clock[1] ?? 0) * 3600 + Number(clock[2]) * 60 + Number(clock[3]);
    else seconds = parseNumber(text, line, column) * DURATION_FACTOR[unit];
    // "-0", "-0.0", "-0:00" are zero; any other minus sign is a negative holding time
    if (minus && (clock ? seconds !== 0 : !isZeroText(text))) throw cellError("negative-duration", line, column, `${text} is negative; a holding time is >= 0`);
    if (!Number.isFinite(seconds)) throw cellError("not-a-number", line, column, `"${text}" is not a finite number (too large)`);
    return Math.abs(seconds);
  }

  private intervalCount(m: IntervalCountMapping, fields: string[], line: number): void {
    const t = this.timestamp(fields, "intervalStart", line);
    const column = this.columnName("intervalStart");
    if (this.sameStart.size > 0)
      throw cellError("duplicate-row", line, column, `repeats the interval start of line ${[...this.sameStart.values()][0]}`);
    const localMinutes = (t.epochMs + t.offsetMinutes * 60_000) / 60_000;
    if (localMinutes % m.intervalMinutes !== 0)
      throw cellError("bad-timestamp", line, column, `${this.cell(fields, "intervalStart")} is not on the ${m.intervalMinutes}-minute grid of the mapping`);
    const attempts = this.count(fields, "attempts", line);
    let carried = 0;
    if (m.carried !== undefined) {
      carried = this.count(fields, "carried", line);
      if (carried > attempts) throw cellError("bad-count", line, this.columnName("carried"), `${carried} calls carried is more than the ${attempts} attempts`);
    }
    this.sameStart.set("interval", line);
    this.start.push(t.epochMs);
    this.offset.push(t.offsetMinutes);
    this.values.push(attempts);
    this.second.push(carried);
  }

  private count(fields: string[], field: string, line: number): number {
    const n = this.number(fields, field, line);
    if (!Number.isInteger(n) || n < 0) throw cellError("bad-count", line, this.columnName(field), `${this.cell(fields, field)} is not a whole number >= 0`);
    return n + 0; // -0 is 0
  }

  /** The finished data set; throws when the file had no header or no data rows. */
  finish(): MeasuredData {
    if (!this.indices) throw new MeasurementInputError("empty-file", "the file is empty: no header line and no rows");
    if (this.rows === 0) throw new MeasurementInputError("no-data", "line 2: the file has a header but no data rows", 2);
    const common = { count: this.start.length, start: this.start.finish(), offset: this.offset.finish(), offsets: [...this.offsets], notes: this.readNotes() };
    if (this.mapping.kind === "call-records")
      return {
        kind: "call-records",
        ...common,
        duration: this.values.finish(),
        outcome: this.outcome.finish(),
        group: this.group.finish(),
        groups: this.mapping.group === undefined ? [""] : [...this.groupIndex.keys()],
        hasOutcome: this.mapping.outcome !== undefined,
        hasGroup: this.mapping.group !== undefined,
      };
    return {
      kind: "interval-counts",
      ...common,
      attempts: this.values.finish(),
      carried: this.mapping.carried === undefined ? null : this.second.finish(),
      intervalMinutes: this.mapping.intervalMinutes,
      meanHoldingSeconds: this.mapping.meanHoldingSeconds ?? null,
    };
  }
}
