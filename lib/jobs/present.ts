// Stored rows -> the API's response shapes (lib/jobs/api-types.ts). Pure; `Wire<T>` checks at compile time that
// what a handler returns is what the browser and the CLI expect once JSON has turned dates into strings.
import type { SweepPointRow, SweepRecord } from "../../db/queries/sweeps";
import { curveOf, gridOf, type PointRun, type SweepSummary } from "../sweeps/index";
import type { SweepPointRun, SweepResponse } from "./api-types";

/** What JSON.stringify makes of T: dates become ISO strings, undefined members vanish. */
export type Wire<T> = T extends Date
  ? string
  : T extends (infer U)[]
    ? Wire<U>[]
    : T extends object
      ? { [K in keyof T]: Wire<T[K]> }
      : T;

/** Response.json serialises dates itself; this only lets the compiler compare shapes. */
export const wire = <T>(value: T): Wire<T> => value as Wire<T>;

const estimate = (interval: { estimate: number; ciLow: number; ciHigh: number } | undefined) =>
  interval ? { estimate: interval.estimate, ciLow: interval.ciLow, ciHigh: interval.ciHigh } : null;

function pointRun(row: SweepPointRow): SweepPointRun {
  return {
    id: row.runId,
    sweepPoint: row.point,
    sweepValues: row.values,
    status: row.status,
    progress: { replicationsDone: row.replicationsDone, replicationsPlanned: row.replicationsPlanned, fraction: row.fraction },
    partial: row.partial,
    callCongestion: estimate(row.result?.callCongestion),
    timeCongestion: estimate(row.result?.timeCongestion),
    error: row.error,
  };
}

/**
 * The stored summary once the sweep has one; while a sweep or grid runs, the summary of its points so far (the
 * same pure functions the worker stores with). A search's answer exists only when it ends.
 */
function summaryOf(record: SweepRecord): SweepSummary | null {
  if (record.stored) return record.stored;
  const points: PointRun[] = record.points.map((p) => ({ runId: p.runId, point: p.point, values: p.values, status: p.status, result: p.result, references: p.references, error: p.error, partial: p.partial }));
  const definition = record.definition;
  if (definition.kind === "sweep") return curveOf(definition, points);
  if (definition.kind === "grid") return gridOf(definition, points);
  return null;
}

export function sweepResponse(record: SweepRecord): SweepResponse {
  const { points, stored: _stored, definition, ...rest } = record;
  return wire({ ...rest, definition: definition as unknown as Record<string, unknown>, result: summaryOf(record), runs: points.map(pointRun) });
}
