// Numbers and times as Spillway shows them: probabilities as percentages with 3 significant figures, traffic in
// erlangs, counts grouped, times in the viewer's own locale and time zone.
import { PROBABILITY_MEASURES } from "@/lib/simulation/result";

const sig = (value: number, digits: number) => Number(value.toPrecision(digits));

/** 0.012345 -> "1.23 %"; tiny values keep 3 significant figures ("0.000123 %"). */
export function formatPercent(p: number | null | undefined, digits = 3): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "–";
  if (p === 0) return "0 %";
  return `${sig(p * 100, digits).toLocaleString(undefined, { maximumSignificantDigits: digits })} %`;
}

/** Difference of two probabilities in percentage points, signed. */
export function formatPoints(d: number | null | undefined, digits = 2): string {
  if (d === null || d === undefined || !Number.isFinite(d)) return "–";
  const v = sig(d * 100, digits);
  return `${v > 0 ? "+" : v < 0 ? "−" : "±"}${Math.abs(v).toLocaleString(undefined, { maximumSignificantDigits: digits })} pp`;
}

export function formatErlangs(a: number | null | undefined, digits = 4): string {
  if (a === null || a === undefined || !Number.isFinite(a)) return "–";
  return `${sig(a, digits).toLocaleString(undefined, { maximumSignificantDigits: digits })} E`;
}

export function formatNumber(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "–";
  if (Number.isInteger(x) && Math.abs(x) < 1e15) return x.toLocaleString();
  return sig(x, digits).toLocaleString(undefined, { maximumSignificantDigits: digits });
}

/** A measure that is a probability (blocking, congestion, loss, waiting) or a level (traffic, counts). */
export function formatMeasure(measure: string, value: number | null | undefined): string {
  return probabilityMeasures.has(measure) ? formatPercent(value) : measure === "carriedTraffic" ? formatErlangs(value) : formatNumber(value);
}

/** The result's probability measures (shown in per cent), from the result's own list. */
export const probabilityMeasures: ReadonlySet<string> = new Set(PROBABILITY_MEASURES);

export function formatDateTime(iso: string | Date | null | undefined): string {
  if (!iso) return "–";
  const d = typeof iso === "string" ? new Date(iso) : iso;
  return d.toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" });
}

export function formatDuration(fromIso: string | null | undefined, toIso: string | null | undefined): string {
  if (!fromIso || !toIso) return "–";
  const s = (new Date(toIso).getTime() - new Date(fromIso).getTime()) / 1000;
  if (!Number.isFinite(s) || s < 0) return "–";
  if (s < 60) return `${s.toFixed(s < 10 ? 1 : 0)} s`;
  const m = Math.floor(s / 60);
  return m < 60 ? `${m} min ${Math.round(s - m * 60)} s` : `${Math.floor(m / 60)} h ${m % 60} min`;
}
