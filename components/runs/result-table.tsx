import { Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { formatErlangs, formatMeasure, formatNumber, formatPoints, probabilityMeasures } from "@/lib/client/format";
import type { Reference, SimulationResult } from "@/lib/simulation";

type Interval = SimulationResult["callCongestion"];

export const measureLabels: Record<string, string> = {
  callCongestion: "Call congestion",
  timeCongestion: "Time congestion",
  carriedTraffic: "Carried traffic",
  attemptCongestion: "Attempt congestion",
  lossProbability: "Loss (never served)",
  waitingProbability: "Waiting probability",
  meanWait: "Mean wait",
  meanWaiting: "Mean number waiting",
};

/** The measures a reference can be compared on, in the order the table shows them. */
export const comparedMeasures = ["callCongestion", "timeCongestion", "carriedTraffic", "attemptCongestion", "lossProbability", "waitingProbability", "meanWait", "meanWaiting"] as const;

export interface ComparisonRow {
  measure: string;
  simulated: Interval;
  reference: Reference;
  value: number;
  difference: number;
  inside: boolean;
}

/** Every (measure, reference) pair with a value on both sides. */
export function comparisonRows(result: SimulationResult): ComparisonRow[] {
  const rows: ComparisonRow[] = [];
  for (const measure of comparedMeasures) {
    const simulated = result[measure as keyof SimulationResult] as Interval | undefined;
    if (!simulated || typeof simulated !== "object" || !("estimate" in simulated)) continue;
    for (const reference of result.references) {
      const value = reference[measure as keyof Reference];
      if (typeof value !== "number") continue;
      rows.push({ measure, simulated, reference, value, difference: simulated.estimate - value, inside: value >= simulated.ciLow && value <= simulated.ciHigh });
    }
  }
  return rows;
}

function formatDifference(measure: string, d: number) {
  if (probabilityMeasures.has(measure)) return formatPoints(d);
  const sign = d > 0 ? "+" : d < 0 ? "−" : "±";
  return `${sign}${measure === "carriedTraffic" ? formatErlangs(Math.abs(d), 2) : formatNumber(Math.abs(d), 2)}`;
}

/** Simulated figures with their intervals beside every reference that gives the same measure. */
export function ResultTable({ result }: { result: SimulationResult }) {
  const rows = comparisonRows(result);
  const confidence = `${Math.round(result.confidence * 100)} %`;
  const measures = comparedMeasures.filter((m) => result[m as keyof SimulationResult]);
  return (
    <Table>
      <caption className="sr-only">Simulated estimates with {confidence} confidence intervals beside each analytic reference</caption>
      <THead>
        <TR>
          <TH>Measure</TH>
          <TH numeric>Simulated</TH>
          <TH numeric>{confidence} interval</TH>
          <TH>Reference</TH>
          <TH numeric>Reference value</TH>
          <TH numeric>Simulated − reference</TH>
          <TH>Reference inside the interval?</TH>
        </TR>
      </THead>
      <TBody>
        {measures.flatMap((measure) => {
          const sim = result[measure as keyof SimulationResult] as Interval;
          const mine = rows.filter((r) => r.measure === measure);
          const simCells = (span: number) => (
            <>
              <TH scope="row" rowSpan={span} className="align-top">
                {measureLabels[measure]}
              </TH>
              <TD numeric rowSpan={span} className="align-top font-semibold">
                {formatMeasure(measure, sim.estimate)}
              </TD>
              <TD numeric rowSpan={span} className="align-top whitespace-nowrap">
                {formatMeasure(measure, sim.ciLow)} – {formatMeasure(measure, sim.ciHigh)}
              </TD>
            </>
          );
          if (!mine.length)
            return [
              <TR key={measure}>
                {simCells(1)}
                <TD colSpan={4} className="text-basin-600">
                  No reference gives this measure.
                </TD>
              </TR>,
            ];
          return mine.map((row, i) => (
            <TR key={`${measure}-${row.reference.method}`} data-testid={`compare-${measure}`}>
              {i === 0 && simCells(mine.length)}
              <TD>
                {row.reference.method}
                {row.reference.exact ? <span className="ml-1 text-xs text-emerald-700">(exact here)</span> : null}
              </TD>
              <TD numeric>{formatMeasure(measure, row.value)}</TD>
              <TD numeric>{formatDifference(measure, row.difference)}</TD>
              <TD>{row.inside ? "Yes" : <strong className="text-red-700">No</strong>}</TD>
            </TR>
          ));
        })}
      </TBody>
    </Table>
  );
}
