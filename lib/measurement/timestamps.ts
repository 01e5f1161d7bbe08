/**
 * Timestamps as call records write them: ISO 8601 / RFC 3339 date and time, "T" or a space
 * between, optional seconds and fraction, optional UTC offset ("Z", "+01:00", "+0100",
 * "+01"). Anything else (day-first dates, month names, epoch numbers) is refused, since a
 * guess could silently swap days and months.
 */
export interface ParsedTimestamp {
  /** instant, milliseconds since 1970-01-01T00:00Z */
  epochMs: number;
  /** UTC offset in minutes of the wall clock the file was written in */
  offsetMinutes: number;
  /** whether the cell carried its own offset */
  explicit: boolean;
}

const PATTERN = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|z|[+-]\d{2}(?::?\d{2})?)?$/;

export const TIMESTAMP_FORMAT = 'YYYY-MM-DD HH:MM[:SS[.fff]] with an optional offset ("Z", "+01:00")';

/** Parses one cell; returns a reason string when it cannot. `defaultOffset` applies when the cell has none. */
export function parseTimestamp(text: string, defaultOffsetMinutes: number): ParsedTimestamp | string {
  const m = PATTERN.exec(text.trim());
  if (!m) return `"${text}" is not a timestamp; expected ${TIMESTAMP_FORMAT}`;
  const [year, month, day, hour, minute] = [1, 2, 3, 4, 5].map((i) => Number(m[i]));
  const second = m[6] === undefined ? 0 : Number(m[6]);
  const fraction = m[7] === undefined ? 0 : Number(`0.${m[7]}`);
  if (month < 1 || month > 12) return `"${text}" has month ${month}`;
  if (day < 1 || day > daysInMonth(year, month)) return `"${text}" has day ${day}, not in ${year}-${String(month).padStart(2, "0")}`;
  if (hour > 23 || minute > 59 || second > 59) return `"${text}" has a time of day out of range`;
  let offsetMinutes = defaultOffsetMinutes;
  const explicit = m[8] !== undefined;
  if (explicit) {
    const parsed = parseOffset(m[8]);
    if (parsed === null) return `"${text}" has the UTC offset "${m[8]}", out of range`;
    offsetMinutes = parsed;
  }
  const local = Date.UTC(year, month - 1, day, hour, minute, second) + Math.round(fraction * 1000);
  return { epochMs: local - offsetMinutes * 60_000, offsetMinutes, explicit };
}

/** "Z" → 0, "+01:00" / "+0100" / "+01" → 60; null when out of range (beyond ±14:00). */
export function parseOffset(text: string): number | null {
  if (text === "Z" || text === "z") return 0;
  const m = /^([+-])(\d{2}):?(\d{2})?$/.exec(text);
  if (!m) return null;
  const hours = Number(m[2]);
  const minutes = m[3] === undefined ? 0 : Number(m[3]);
  if (hours > 14 || minutes > 59 || (hours === 14 && minutes > 0)) return null;
  return (m[1] === "-" ? -1 : 1) * (hours * 60 + minutes);
}

function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

/** ISO text of an instant on the wall clock with the given offset, e.g. "2026-01-12T10:00:00+01:00". */
export function formatLocal(epochMs: number, offsetMinutes: number, withSeconds = true): string {
  const d = new Date(epochMs + offsetMinutes * 60_000).toISOString();
  const sign = offsetMinutes < 0 ? "-" : "+";
  const abs = Math.abs(offsetMinutes);
  const offset = abs === 0 ? "Z" : `${sign}${String(Math.floor(abs / 60)).padStart(2, "0")}:${String(abs % 60).padStart(2, "0")}`;
  return `${d.slice(0, withSeconds ? 19 : 16)}${offset}`;
}
