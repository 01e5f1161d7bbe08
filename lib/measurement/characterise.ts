import { fitHoldingTimes, type FitOptions, type HoldingFit } from "./fit";
import { FAMILIES, type FamilyName } from "./laws";
import { MeasurementInputError } from "./errors";
import { OUTCOMES } from "./mapping";
import type { CallRecordSet, IntervalCountSet, MeasuredData } from "./records";
import { measuredPeakedness, type MeasuredPeakedness } from "./peakedness";
import { formatLocal } from "./timestamps";

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 1440 * MINUTE;

/**
 * Plausibility of single calls (finding: one stuck record decided the busy hour). Offered traffic
 * keeps its definition (each call's whole holding time charged to its start interval), but a
 * call is flagged in the notes when
 * - its holding time exceeds LONGEST_PLAUSIBLE_SECONDS (24 h; common practice, no source: a
 *   circuit held for more than a day is usually a record that was never closed), or
 * - it starts in a busy-hour window, holds longer than that one-hour window (so it is charged
 *   more than the one erlang-hour a single circuit can occupy in the window), and alone makes up
 *   at least BUSY_HOUR_SHARE_LIMIT of the busy hour's mean offered traffic (10 %; common
 *   practice, no source).
 * Either way the figures may rest on one record, which the user should check.
 */
export const LONGEST_PLAUSIBLE_SECONDS = 86_400;
export const BUSY_HOUR_SHARE_LIMIT = 0.1;
/** At most this many suspicious calls are named in the notes (the rest are counted). */
const SUSPICIOUS_NAMED = 5;

/**
 * Busy-hour definition used throughout: the time-consistent busy hour (ITU-T E.500), the
 * one-hour window starting at the same clock time every day whose offered traffic, averaged
 * over the days measured, is greatest. Windows start on a grid of `busyHourStepMinutes`
 * (quarter hours by default) and lie within one day; ties go to the earliest. With a single day
 * the definition reduces to that day's busiest hour, and nothing shows how it varies between days.
 */
export const BUSY_HOUR_DEFINITION =
  "time-consistent busy hour (ITU-T E.500): the one-hour window, starting at the same clock time each day on a quarter-hour grid, with the highest offered traffic averaged over the days measured";

export interface CharacteriseOptions {
  /** interval length for call records (minutes, dividing 60); interval counts use the file's */
  intervalMinutes?: number;
  busyHourStepMinutes?: number;
  /** only this route or group (call records with a group column) */
  group?: string | null;
  fit?: FitOptions;
  /** reports the stage reached, 0..1, for the worker's progress */
  onProgress?: (fraction: number, stage: string) => void;
}

export interface BusyHour {
  definition: string;
  /** minutes after local midnight */
  startMinute: number;
  label: string;
  /** mean offered traffic over the window and days, erlangs (attempts per hour when no holding time is known) */
  meanTraffic: number;
  measure: "offered traffic" | "attempts";
  singleDay: boolean;
  /** per day: that day's traffic in the window */
  days: Array<{ day: string; traffic: number }>;
  /** each candidate window: its mean traffic (for the profile chart) */
  candidates: Array<{ startMinute: number; traffic: number }>;
}

/** variance / mean of the number of calls in progress within each day's busy hour, corrected for the window means (peakedness.ts) */
export type Peakedness = MeasuredPeakedness;

export interface DispersionOfCounts {
  /** pooled within-day variance / mean of arrival counts in windows of windowSeconds */
  value: number;
  windowSeconds: number;
  windows: number;
  /** standard error under Poisson counts, √(2 / (windows − days)) */
  standardErrorIfPoisson: number;
}

export interface SimultaneousCalls {
  day: string;
  /** seconds from the window start where the count changes, with the count from there on */
  times: number[];
  counts: number[];
}

export interface HoldingCharts {
  histogram: { edges: number[]; density: number[]; beyond: number };
  densities: { x: number[] } & Partial<Record<FamilyName, number[]>>;
  qq: Partial<Record<FamilyName, { sample: number[]; fitted: number[] }>>;
}

export interface Characterisation {
  kind: MeasuredData["kind"];
  group: string | null;
  period: { first: string; last: string; days: number; offsetMinutes: number; offsets: number[] };
  intervalMinutes: number;
  /** the whole period, interval by interval (instants in ms since the epoch) */
  series: { start: number[]; arrivals: number[]; offeredTraffic: number[] | null; carriedTraffic: number[] | null };
  /** mean over days of each clock interval: arrivals per hour and offered traffic */
  profile: { startMinute: number[]; ratePerHour: number[]; offeredTraffic: number[] | null; days: number[] };
  busyHour: BusyHour;
  busy: {
    attempts: number;
    ratePerHour: number;
    offeredTraffic: number | null;
    meanHoldingSeconds: number | null;
    interarrivalScv: number | null;
    interarrivals: number;
    peakedness: Peakedness | null;
    dispersion: DispersionOfCounts | null;
    simultaneous: SimultaneousCalls[];
  };
  meanHoldingSeconds: number | null;
  outcomes: Record<string, number> | null;
  groups: Array<{ name: string; calls: number }> | null;
  holding: (HoldingFit & { charts: HoldingCharts; empiricalSample: number[] }) | null;
  notes: string[];
}

interface View {
  /** local wall-clock ms ("as if UTC") */
  local: Float64Array;
  first: number;
  last: number;
  /** the records giving first and last (their own offsets label the period) */
  firstIndex: number;
  lastIndex: number;
}

function localTimes(start: Float64Array, offset: Int16Array, keep: (i: number) => boolean): View {
  const local = new Float64Array(start.length);
  let first = Infinity;
  let last = -Infinity;
  let firstIndex = -1;
  let lastIndex = -1;
  for (let i = 0; i < start.length; i++) {
    local[i] = start[i] + offset[i] * MINUTE;
    if (!keep(i)) continue;
    if (local[i] < first) [first, firstIndex] = [local[i], i];
    if (local[i] > last) [last, lastIndex] = [local[i], i];
  }
  return { local, first, last, firstIndex, lastIndex };
}

/**
 * The instant of a local wall-clock time (ms "as if UTC"), on the records' clock. A file has at
 * most one UTC-offset change (records.ts); it is placed at the last whole UTC hour at or before
 * the first record on the new offset, unless that is not after the last record on the old
 * offset, then at that first new record. Local times whose old-offset instant falls before the
 * change take the old offset, the rest the new one.
 */
function clockOf(data: MeasuredData): (localMs: number) => number {
  const old = data.offset[0];
  let j = 0;
  while (j < data.count && data.offset[j] === old) j++;
  if (j === data.count) return (localMs) => localMs - old * MINUTE;
  const next = data.offset[j];
  let change = Math.floor(data.start[j] / HOUR) * HOUR;
  if (change <= data.start[j - 1]) change = data.start[j];
  return (localMs) => (localMs - old * MINUTE < change ? localMs - old * MINUTE : localMs - next * MINUTE);
}

const dayLabel = (dayIndex: number) => new Date(dayIndex * DAY).toISOString().slice(0, 10);
const clock = (minute: number) => `${String(Math.floor(minute / 60) % 24).padStart(2, "0")}:${String(minute % 60).padStart(2, "0")}`;

export function characterise(data: MeasuredData, options: CharacteriseOptions = {}): Characterisation {
  return data.kind === "call-records" ? characteriseCalls(data, options) : characteriseCounts(data, options);
}

/** Interval grid over whole local days from the first to the last record. */
function grid(view: View, intervalMinutes: number) {
  const day0 = Math.floor(view.first / DAY);
  const days = Math.floor(view.last / DAY) - day0 + 1;
  const perDay = 1440 / intervalMinutes;
  const width = intervalMinutes * MINUTE;
  const firstInterval = Math.floor((view.first - day0 * DAY) / width);
  const lastInterval = Math.floor((view.last - day0 * DAY) / width);
  return { day0, days, perDay, width, firstInterval, lastInterval, count: days * perDay };
}

/**
 * The period's labels (each on its own record's clock) and each interval's start instant (the
 * local grid time on the clock in force then, see clockOf; after a daylight-saving change the
 * instants follow the new offset).
 */
function periodOf(view: View, g: ReturnType<typeof grid>, data: MeasuredData): { period: Characterisation["period"]; starts: number[] } {
  const instant = clockOf(data);
  return {
    period: {
      first: formatLocal(data.start[view.firstIndex], data.offset[view.firstIndex]),
      last: formatLocal(data.start[view.lastIndex], data.offset[view.lastIndex]),
      days: g.days,
      offsetMinutes: data.offset[view.firstIndex],
      offsets: data.offsets,
    },
    starts: Array.from({ length: g.count }, (_, k) => instant(g.day0 * DAY + k * g.width)),
  };
}

const SINGLE_DAY_NOTE = "One day only: the time-consistent busy hour is that day's busiest hour; no day-to-day variation can be seen.";

/** Mean over covered days of each clock interval; `covered` counts the days per clock interval. */
function profileOf(values: Float64Array, g: ReturnType<typeof grid>) {
  const sum = new Float64Array(g.perDay);
  const covered = new Float64Array(g.perDay);
  for (let k = g.firstInterval; k <= g.lastInterval; k++) {
    sum[k % g.perDay] += values[k];
    covered[k % g.perDay]++;
  }
  return { mean: Array.from(sum, (s, j) => (covered[j] ? s / covered[j] : 0)), covered: Array.from(covered) };
}

function findBusyHour(meanTraffic: number[], covered: number[], g: ReturnType<typeof grid>, intervalMinutes: number, stepMinutes: number, traffic: Float64Array, measure: BusyHour["measure"]): BusyHour {
  const step = Math.max(stepMinutes, intervalMinutes);
  if (step % intervalMinutes !== 0) throw new Error(`busy-hour step ${stepMinutes} min is not a multiple of the ${intervalMinutes}-min interval`);
  const span = 60 / intervalMinutes;
  const candidates: BusyHour["candidates"] = [];
  let best = { startMinute: 0, traffic: -Infinity };
  for (let s = 0; s + 60 <= 1440; s += step) {
    const j0 = s / intervalMinutes;
    let sum = 0;
    let seen = 0;
    for (let j = j0; j < j0 + span; j++) {
      sum += meanTraffic[j];
      if (covered[j] > 0) seen++;
    }
    if (seen < span) continue; // a window the measurement never fully covered
    const t = sum / span;
    candidates.push({ startMinute: s, traffic: t });
    if (t > best.traffic) best = { startMinute: s, traffic: t };
  }
  if (candidates.length === 0)
    throw new MeasurementInputError("no-data", "the measurement covers no complete clock hour, so no busy hour can be found: upload records spanning at least one whole hour (e.g. 10:00 to 11:00)");
  const days: BusyHour["days"] = [];
  const j0 = best.startMinute / intervalMinutes;
  for (let d = 0; d < g.days; d++) {
    const k0 = d * g.perDay + j0;
    if (k0 < g.firstInterval || k0 + span - 1 > g.lastInterval) continue;
    let sum = 0;
    for (let k = k0; k < k0 + span; k++) sum += traffic[k];
    days.push({ day: dayLabel(g.day0 + d), traffic: sum / span });
  }
  return {
    definition: BUSY_HOUR_DEFINITION,
    startMinute: best.startMinute,
    label: `${clock(best.startMinute)}–${clock(best.startMinute + 60)}`,
    meanTraffic: best.traffic,
    measure,
    singleDay: days.length <= 1,
    days,
    candidates,
  };
}

function characteriseCalls(data: CallRecordSet, options: CharacteriseOptions): Characterisation {
  const progress = options.onProgress ?? (() => {});
  const intervalMinutes = options.intervalMinutes ?? 15;
  if (![5, 10, 15, 20, 30, 60].includes(intervalMinutes)) throw new Error("intervalMinutes must be 5, 10, 15, 20, 30 or 60");
  const groupIndex = options.group == null ? -1 : data.groups.indexOf(options.group);
  if (options.group != null && groupIndex < 0)
    throw new MeasurementInputError("bad-mapping", `no group "${options.group}" in the file${data.hasGroup ? `; its groups are ${data.groups.slice(0, 10).map((n) => `"${n}"`).join(", ")}${data.groups.length > 10 ? ", …" : ""}` : ": it has no group column"}`, undefined, "group");
  const keep = (i: number) => groupIndex < 0 || data.group[i] === groupIndex;
  const view = localTimes(data.start, data.offset, keep);
  if (!Number.isFinite(view.first)) throw new MeasurementInputError("no-data", "no calls in the selection");
  // What reading the file noticed (e.g. rows repeating the previous one) comes first.
  const notes: string[] = [...(data.notes ?? [])];

  // Mean holding time of answered calls; attempts without a holding time offer that mean.
  let answered = 0;
  let holdingSum = 0;
  const outcomeCounts = [0, 0, 0];
  for (let i = 0; i < data.count; i++) {
    if (!keep(i)) continue;
    outcomeCounts[data.outcome[i]]++;
    if (data.outcome[i] === 0) {
      answered++;
      holdingSum += data.duration[i];
    }
  }
  const meanHolding = answered ? holdingSum / answered : 0;
  if (answered === 0)
    throw new MeasurementInputError("no-data", "the file has no answered calls, so holding times and offered traffic cannot be measured: every record is blocked or abandoned", undefined, "outcome");
  if (data.hasOutcome && answered < outcomeCounts.reduce((a, b) => a + b, 0))
    notes.push(
      "Offered traffic counts each blocked or abandoned attempt at the mean holding time of answered calls; calls in progress, peakedness and the holding-time fits use answered calls only, so much blocking makes the measured peakedness too low.",
    );

  const g = grid(view, intervalMinutes);
  const arrivals = new Float64Array(g.count);
  const offered = new Float64Array(g.count);
  const carried = new Float64Array(g.count);
  const widthSeconds = intervalMinutes * 60;
  for (let i = 0; i < data.count; i++) {
    if (!keep(i)) continue;
    const t = view.local[i] - g.day0 * DAY;
    const k = Math.floor(t / g.width);
    arrivals[k]++;
    const ok = data.outcome[i] === 0;
    offered[k] += ok ? data.duration[i] : meanHolding;
    if (!ok) continue;
    // carried: spread the holding time over the intervals it overlaps
    let from = t;
    const to = t + data.duration[i] * 1000;
    for (let kk = k; kk < g.count && from < to; kk++) {
      const edge = (kk + 1) * g.width;
      carried[kk] += (Math.min(edge, to) - from) / 1000;
      from = edge;
    }
  }
  for (let k = 0; k < g.count; k++) {
    offered[k] /= widthSeconds;
    carried[k] /= widthSeconds;
  }
  progress(0.1, "intervals");

  const offeredProfile = profileOf(offered, g);
  const arrivalProfile = profileOf(arrivals, g);
  const busyHour = findBusyHour(offeredProfile.mean, offeredProfile.covered, g, intervalMinutes, options.busyHourStepMinutes ?? 15, offered, "offered traffic");
  if (busyHour.singleDay) notes.push(SINGLE_DAY_NOTE);
  if (data.offsets.length > 1) notes.push("The file changes UTC offset once (daylight saving): clock-time profiles use each record's own wall clock.");

  const busy = busyHourCalls(data, keep, busyHour, meanHolding);
  notes.push(...suspiciousCalls(data, keep, busyHour));
  if (busy.interarrivals > 1 && busy.interarrivalScv === null)
    notes.push("Every busy-hour attempt starts at the same instant as the one before: the interarrival scv is undefined (all gaps are 0), and the timestamps may be truncated.");
  progress(0.2, "busy hour");

  const durations: number[] = [];
  for (let i = 0; i < data.count; i++) if (keep(i) && data.outcome[i] === 0) durations.push(data.duration[i]);
  const fit = durations.filter((d) => d > 0).length >= 2 ? fitHoldingTimes(durations, options.fit) : null;
  if (fit && fit.zeros > 0) notes.push(`${fit.zeros} answered call${fit.zeros === 1 ? "" : "s"} with zero holding time left out of the holding-time fits.`);
  progress(0.95, "fits");

  const frame = periodOf(view, g, data);
  return {
    kind: "call-records",
    group: options.group ?? null,
    period: frame.period,
    intervalMinutes,
    series: {
      start: frame.starts,
      arrivals: Array.from(arrivals),
      offeredTraffic: Array.from(offered),
      carriedTraffic: Array.from(carried),
    },
    profile: {
      startMinute: Array.from({ length: g.perDay }, (_, j) => j * intervalMinutes),
      ratePerHour: arrivalProfile.mean.map((a) => (a * 60) / intervalMinutes),
      offeredTraffic: offeredProfile.mean,
      days: arrivalProfile.covered,
    },
    busyHour,
    busy,
    meanHoldingSeconds: meanHolding,
    outcomes: data.hasOutcome ? Object.fromEntries(OUTCOMES.map((o, i) => [o, outcomeCounts[i]])) : null,
    groups: data.hasGroup ? data.groups.map((name, gi) => ({ name, calls: countWhere(data.group, gi) })) : null,
    holding: fit ? { ...fit, charts: holdingCharts(durations.filter((d) => d > 0), fit), empiricalSample: quantileSample(durations.filter((d) => d > 0), 1000) } : null,
    notes,
  };
}

/** Notes naming calls whose holding time is implausibly long or alone decides the busy hour (see LONGEST_PLAUSIBLE_SECONDS). */
function suspiciousCalls(data: CallRecordSet, keep: (i: number) => boolean, bh: BusyHour): string[] {
  const windowDays = new Set(bh.days.map(({ day }) => Math.round(Date.parse(`${day}T00:00:00Z`) / DAY)));
  const found: Array<{ i: number; why: string }> = [];
  for (let i = 0; i < data.count; i++) {
    if (!keep(i) || data.outcome[i] !== 0) continue;
    const seconds = data.duration[i];
    if (seconds <= 3600) continue;
    const reasons: string[] = [];
    if (seconds > LONGEST_PLAUSIBLE_SECONDS) reasons.push("is longer than 24 h");
    const local = data.start[i] + data.offset[i] * MINUTE;
    const day = Math.floor(local / DAY);
    const minute = (local - day * DAY) / MINUTE;
    if (windowDays.has(day) && minute >= bh.startMinute && minute < bh.startMinute + 60 && bh.meanTraffic > 0) {
      // its whole holding time is charged to this day's window; the busy hour averages the days
      const share = seconds / 3600 / bh.days.length / bh.meanTraffic;
      if (share >= BUSY_HOUR_SHARE_LIMIT) reasons.push(`alone makes up ${Math.round(share * 100)} % of the busy hour's offered traffic (${bh.label})`);
    }
    if (reasons.length) found.push({ i, why: reasons.join(" and ") });
  }
  const notes = found.slice(0, SUSPICIOUS_NAMED).map(({ i, why }) => {
    const seconds = data.duration[i];
    return `Check the call starting ${formatLocal(data.start[i], data.offset[i])}: its holding time of ${seconds < 1e9 ? Math.round(seconds) : seconds.toExponential(3)} s (${seconds / 3600 < 1e6 ? (seconds / 3600).toFixed(1) : (seconds / 3600).toExponential(3)} h) ${why}. Offered traffic charges a call's whole holding time to the interval it starts in, so one such record (for example a call that was never closed) can decide the busy hour; correct or remove it if it is wrong.`;
  });
  if (found.length > SUSPICIOUS_NAMED) notes.push(`${found.length - SUSPICIOUS_NAMED} more calls are implausibly long or alone decide much of the busy hour; check the longest holding times in the file.`);
  return notes;
}

function countWhere(a: Uint16Array, v: number): number {
  let n = 0;
  for (const x of a) if (x === v) n++;
  return n;
}

/** Interarrivals, calls in progress and counts within each day's busy-hour window. */
function busyHourCalls(data: CallRecordSet, keep: (i: number) => boolean, bh: BusyHour, meanHolding: number): Characterisation["busy"] {
  const windowMs = 60 * MINUTE;
  let maxDuration = 0;
  for (let i = 0; i < data.count; i++) if (keep(i) && data.outcome[i] === 0) maxDuration = Math.max(maxDuration, data.duration[i] * 1000);
  const tau = Math.min(900, Math.max(1, Math.round(meanHolding)));
  const bins = Math.floor(3600 / tau);
  let attempts = 0;
  let gapSum = 0;
  let gapSq = 0;
  let gaps = 0;
  let integralN = 0;
  let withinSq = 0;
  let observed = 0;
  const heldInWindows: number[] = [];
  let countSum = 0;
  let countSq = 0;
  let countWindows = 0;
  let countDays = 0;
  const simultaneous: SimultaneousCalls[] = [];
  const instant = clockOf(data);
  for (const { day } of bh.days) {
    const d = Math.round(Date.parse(`${day}T00:00:00Z`) / DAY);
    const w0Local = d * DAY + bh.startMinute * MINUTE;
    // the window's wall clock: the offset in force then (one daylight-saving change at most)
    const w0 = instant(w0Local);
    const w1 = w0 + windowMs;
    const events: Array<[number, number]> = [];
    const counts = new Float64Array(bins);
    let previous = NaN;
    for (let i = lowerBound(data.start, w0 - maxDuration); i < data.count && data.start[i] < w1; i++) {
      if (!keep(i)) continue;
      const t = data.start[i];
      if (t >= w0) {
        attempts++;
        const b = Math.floor((t - w0) / (tau * 1000));
        if (b < bins) counts[b]++;
        if (!Number.isNaN(previous)) {
          const gap = (t - previous) / 1000;
          gapSum += gap;
          gapSq += gap * gap;
          gaps++;
        }
        previous = t;
      }
      if (data.outcome[i] !== 0) continue;
      if (t >= w0) heldInWindows.push(data.duration[i]);
      const end = t + data.duration[i] * 1000;
      if (end <= w0) continue;
      events.push([Math.max(t, w0), 1], [Math.min(end, w1), -1]);
    }
    events.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
    let n = 0;
    let last = w0;
    let sumN = 0;
    let sumN2 = 0;
    const times: number[] = [0];
    const levels: number[] = [0];
    for (const [t, step] of events) {
      sumN += n * (t - last);
      sumN2 += n * n * (t - last);
      last = t;
      n += step;
      if (times[times.length - 1] === (t - w0) / 1000) levels[levels.length - 1] = n;
      else {
        times.push((t - w0) / 1000);
        levels.push(n);
      }
    }
    sumN += n * (w1 - last);
    sumN2 += n * n * (w1 - last);
    const T = windowMs / 1000;
    sumN /= 1000;
    sumN2 /= 1000;
    integralN += sumN;
    withinSq += sumN2 - (sumN * sumN) / T;
    observed += T;
    if (simultaneous.length < 31) simultaneous.push({ day, times, counts: levels });
    let dayCount = 0;
    for (const c of counts) dayCount += c;
    const dayMean = dayCount / bins;
    for (const c of counts) countSq += (c - dayMean) ** 2;
    countSum += dayCount;
    countWindows += bins;
    countDays++;
  }
  const hours = observed / 3600;
  const countMean = countSum / countWindows;
  const countVar = countSq / Math.max(1, countWindows - countDays);
  // all gaps 0 (same instant): the scv's denominator is 0, so it is undefined (null), not NaN
  const scv = gaps > 1 && gapSum > 0 ? (gapSq / gaps - (gapSum / gaps) ** 2) * (gaps / (gaps - 1)) / (gapSum / gaps) ** 2 : null;
  return {
    attempts,
    ratePerHour: attempts / hours,
    offeredTraffic: bh.meanTraffic,
    meanHoldingSeconds: meanHolding,
    interarrivalScv: scv,
    interarrivals: gaps,
    peakedness: measuredPeakedness({ integralN, withinSquares: withinSq, observedSeconds: observed, windowSeconds: windowMs / 1000, holdingSeconds: heldInWindows }),
    dispersion:
      countMean > 0 && countWindows - countDays > 0
        ? { value: countVar / countMean, windowSeconds: tau, windows: countWindows, standardErrorIfPoisson: Math.sqrt(2 / (countWindows - countDays)) }
        : null,
    simultaneous,
  };
}

function lowerBound(a: Float64Array, v: number): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (a[mid] < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Order statistics at probabilities (i − ½)/k (linear interpolation), at most k values. */
export function quantileSample(values: number[], k: number): number[] {
  const sorted = Float64Array.from(values).sort();
  if (sorted.length <= k) return Array.from(sorted);
  return Array.from({ length: k }, (_, i) => interpolatedQuantile(sorted, (i + 0.5) / k));
}

function interpolatedQuantile(sorted: Float64Array, p: number): number {
  const h = p * (sorted.length - 1);
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * ((sorted[Math.min(lo + 1, sorted.length - 1)] ?? sorted[lo]) - sorted[lo]);
}

/** Histogram (Freedman–Diaconis width, at most 60 bins up to the 99th percentile), fitted densities and Q–Q points. */
function holdingCharts(values: number[], fit: HoldingFit): HoldingCharts {
  const sorted = Float64Array.from(values).sort();
  const n = sorted.length;
  const top = interpolatedQuantile(sorted, 0.99);
  const iqr = interpolatedQuantile(sorted, 0.75) - interpolatedQuantile(sorted, 0.25);
  const fd = iqr > 0 ? (2 * iqr) / Math.cbrt(n) : top / 20;
  const binCount = Math.max(5, Math.min(60, Math.ceil(top / fd)));
  const width = top / binCount;
  const counts = new Array<number>(binCount).fill(0);
  let beyond = 0;
  for (const x of sorted) {
    const b = Math.floor(x / width);
    if (b < binCount) counts[b]++;
    else beyond++;
  }
  const edges = Array.from({ length: binCount + 1 }, (_, i) => i * width);
  const xs = Array.from({ length: 200 }, (_, i) => ((i + 0.5) * top) / 200);
  const densities: HoldingCharts["densities"] = { x: xs };
  const qq: HoldingCharts["qq"] = {};
  const probs = Array.from({ length: 100 }, (_, i) => (i + 0.5) / 100);
  for (const f of fit.fits) {
    const family = FAMILIES[f.family];
    densities[f.family] = xs.map((x) => family.pdf(f.parameters, x));
    qq[f.family] = { sample: probs.map((p) => interpolatedQuantile(sorted, p)), fitted: probs.map((p) => family.quantile(f.parameters, p)) };
  }
  return { histogram: { edges, density: counts.map((c) => c / (n * width)), beyond: beyond / n }, densities, qq };
}

function characteriseCounts(data: IntervalCountSet, options: CharacteriseOptions): Characterisation {
  const intervalMinutes = data.intervalMinutes;
  const view = localTimes(data.start, data.offset, () => true);
  const g = grid(view, intervalMinutes);
  const arrivals = new Float64Array(g.count);
  const carriedCalls = new Float64Array(g.count);
  const present = new Uint8Array(g.count);
  for (let i = 0; i < data.count; i++) {
    const k = Math.floor((view.local[i] - g.day0 * DAY) / g.width);
    arrivals[k] += data.attempts[i];
    if (data.carried) carriedCalls[k] += data.carried[i];
    present[k] = 1;
  }
  const h = data.meanHoldingSeconds;
  const widthSeconds = intervalMinutes * 60;
  const offered = h ? arrivals.map((a) => (a * h) / widthSeconds) : null;
  const notes: string[] = [...(data.notes ?? [])];
  let missing = 0;
  for (let k = g.firstInterval; k <= g.lastInterval; k++) if (!present[k]) missing++;
  if (missing) notes.push(`${missing} interval${missing === 1 ? "" : "s"} inside the period have no row and count as zero attempts.`);
  if (!h) notes.push("No mean holding time was given: the busy hour is the hour with the most attempts, and no offered traffic is shown.");
  const measureValues = offered ?? arrivals;
  const prof = profileOf(measureValues, g);
  const arrivalProfile = profileOf(arrivals, g);
  const busyHour = findBusyHour(prof.mean, prof.covered, g, intervalMinutes, Math.max(intervalMinutes, options.busyHourStepMinutes ?? 15), measureValues, offered ? "offered traffic" : "attempts");
  if (!offered) {
    // attempts per interval → attempts per hour, so the figure reads as a rate
    busyHour.meanTraffic *= 60 / intervalMinutes;
    busyHour.days.forEach((d) => (d.traffic *= 60 / intervalMinutes));
    busyHour.candidates.forEach((c) => (c.traffic *= 60 / intervalMinutes));
  }
  if (busyHour.singleDay) notes.push(SINGLE_DAY_NOTE);

  // Dispersion of the busy-hour interval counts around each day's mean (needs ≥ 2 intervals per hour).
  const span = 60 / intervalMinutes;
  let attempts = 0;
  let sq = 0;
  let windows = 0;
  let days = 0;
  for (const { day } of busyHour.days) {
    const d = Math.round(Date.parse(`${day}T00:00:00Z`) / DAY) - g.day0;
    const k0 = d * g.perDay + busyHour.startMinute / intervalMinutes;
    let sum = 0;
    for (let k = k0; k < k0 + span; k++) sum += arrivals[k];
    for (let k = k0; k < k0 + span; k++) sq += (arrivals[k] - sum / span) ** 2;
    attempts += sum;
    windows += span;
    days++;
  }
  const mean = attempts / windows;
  const dispersion: DispersionOfCounts | null =
    span > 1 && mean > 0 ? { value: sq / (windows - days) / mean, windowSeconds: widthSeconds, windows, standardErrorIfPoisson: Math.sqrt(2 / (windows - days)) } : null;
  if (!dispersion) notes.push("Hourly counts give one count per busy hour a day: the index of dispersion needs shorter intervals.");
  const frame = periodOf(view, g, data);
  return {
    kind: "interval-counts",
    group: null,
    period: frame.period,
    intervalMinutes,
    series: {
      start: frame.starts,
      arrivals: Array.from(arrivals),
      offeredTraffic: offered ? Array.from(offered) : null,
      carriedTraffic: data.carried && h ? Array.from(carriedCalls, (c) => (c * h) / widthSeconds) : null,
    },
    profile: {
      startMinute: Array.from({ length: g.perDay }, (_, j) => j * intervalMinutes),
      ratePerHour: arrivalProfile.mean.map((a) => (a * 60) / intervalMinutes),
      offeredTraffic: offered ? prof.mean : null,
      days: arrivalProfile.covered,
    },
    busyHour,
    busy: {
      attempts,
      ratePerHour: attempts / days,
      offeredTraffic: offered ? busyHour.meanTraffic : null,
      meanHoldingSeconds: h,
      interarrivalScv: null,
      interarrivals: 0,
      peakedness: null,
      dispersion,
      simultaneous: [],
    },
    meanHoldingSeconds: h,
    outcomes: null,
    groups: null,
    holding: null,
    notes,
  };
}
