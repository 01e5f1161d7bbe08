// CSV and JSON downloads of a run's estimates and a sweep's points. Pure (papaparse's unparse does the quoting).
import Papa from "papaparse";
import type { SimulationResult } from "../simulation/index";
import type { SweepSummary } from "../sweeps/index";
import type { RunResponse, SweepResponse } from "./api-types";

type Interval = { estimate: number; standardError: number; halfWidth: number; ciLow: number; ciHigh: number };

const isInterval = (value: unknown): value is Interval =>
  !!value && typeof value === "object" && typeof (value as Interval).estimate === "number" && typeof (value as Interval).ciLow === "number";

/**
 * One row per measure the result has (in the result's own order), its interval, and one column per analytic
 * reference with that reference's value for the measure where it gives one.
 */
export function runCsv(result: SimulationResult): string {
  const measures = Object.entries(result).filter((entry): entry is [string, Interval] => isInterval(entry[1]));
  const references = result.references.map((r, i) => ({ label: `${r.method}${r.exact ? " (exact)" : ""}`, index: i, values: r as unknown as Record<string, unknown> }));
  const fields = ["measure", "estimate", "standardError", "halfWidth", "ciLow", "ciHigh", "confidence", "replications", ...references.map((r) => r.label)];
  const data = measures.map(([measure, m]) => [
    measure,
    m.estimate,
    m.standardError,
    m.halfWidth,
    m.ciLow,
    m.ciHigh,
    result.confidence,
    result.replications,
    ...references.map((r) => (typeof r.values[measure] === "number" ? r.values[measure] : "")),
  ]);
  return Papa.unparse({ fields, data });
}

/** Per-point verdicts and formula values from the sweep's summary, keyed by point. */
function summaryColumns(summary: SweepSummary | null): { fields: string[]; of: (point: number) => (string | number)[] } {
  if (summary?.kind === "grid") {
    const cells = new Map(summary.cells.map((c) => [c.point, c]));
    return { fields: ["verdict", "margin"], of: (p) => [cells.get(p)?.verdict ?? "", cells.get(p)?.margin ?? ""] };
  }
  if (summary?.kind === "sweep") {
    const points = new Map(summary.points.map((c) => [c.point, c]));
    return { fields: summary.methods, of: (p) => summary.methods.map((m) => points.get(p)?.analytic[m] ?? "") };
  }
  if (summary?.kind === "dimensioning") {
    const probes = new Map(summary.probes.map((c) => [c.point, c]));
    return { fields: ["meetsTarget"], of: (p) => [probes.get(p)?.meets === null || probes.get(p) === undefined ? "" : String(probes.get(p)!.meets)] };
  }
  return { fields: [], of: () => [] };
}

/** One row per point: the swept values, status, both congestions with their intervals, and the summary's verdict. */
export function sweepCsv(sweep: SweepResponse): string {
  const parameters = [...new Set(sweep.runs.flatMap((r) => Object.keys(r.sweepValues)))];
  const extra = summaryColumns(sweep.result);
  const fields = [
    "point",
    ...parameters,
    "status",
    "partial",
    "replications",
    "callCongestion",
    "callCongestionLow",
    "callCongestionHigh",
    "timeCongestion",
    "timeCongestionLow",
    "timeCongestionHigh",
    ...extra.fields,
    "runId",
    "error",
  ];
  const data = sweep.runs.map((r) => [
    r.sweepPoint,
    ...parameters.map((p) => r.sweepValues[p] ?? ""),
    r.status,
    String(r.partial),
    r.progress.replicationsDone,
    r.callCongestion?.estimate ?? "",
    r.callCongestion?.ciLow ?? "",
    r.callCongestion?.ciHigh ?? "",
    r.timeCongestion?.estimate ?? "",
    r.timeCongestion?.ciLow ?? "",
    r.timeCongestion?.ciHigh ?? "",
    ...extra.of(r.sweepPoint),
    r.id,
    r.error ?? "",
  ]);
  return Papa.unparse({ fields, data });
}

/** A download: the body with a type and a file name. */
export function download(body: string, type: "text/csv" | "application/json", filename: string): Response {
  return new Response(body, {
    headers: { "content-type": `${type}; charset=utf-8`, "content-disposition": `attachment; filename="${filename}"`, "cache-control": "no-store" },
  });
}

export const runFileName = (run: Pick<RunResponse, "id">, extension: "csv" | "json") => `spillway-run-${run.id}.${extension}`;
export const sweepFileName = (sweep: Pick<SweepResponse, "id" | "kind">, extension: "csv" | "json") => `spillway-${sweep.kind}-${sweep.id}.${extension}`;
