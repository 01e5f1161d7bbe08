// The figures of the per-segment chart as a table (run page and printable report): no hooks, so server components
// render it too.
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { formatErlangs, formatPercent } from "@/lib/client/format";
import type { SimulationResult } from "@/lib/simulation";
import { presentReferences, segmentInterval, segmentTime } from "./segment-words";

/** One row per profile segment: its time in the cycle, offered traffic, simulated call congestion with its interval, and each per-segment reference. */
export function SegmentTable({ result }: { result: SimulationResult }) {
  const segments = result.segments;
  if (!segments?.length) return null;
  const conf = `${Math.round(result.confidence * 100)} %`;
  const references = presentReferences(segments);
  return (
    <Table data-testid="segment-table">
      <caption className="sr-only">Call congestion in each segment of the load profile: simulated with its {conf} interval beside each per-segment analytic value</caption>
      <THead>
        <TR>
          <TH>Time in the cycle</TH>
          <TH numeric>Offered traffic</TH>
          <TH numeric>Simulated</TH>
          <TH numeric>{conf} interval</TH>
          {references.map((r) => (
            <TH key={r.key} numeric>
              <span title={r.long}>{r.label}</span>
              <span className="sr-only">: {r.long}</span>
            </TH>
          ))}
        </TR>
      </THead>
      <TBody>
        {segments.map((g) => (
          <TR key={g.index} data-testid="segment-row">
            <TH scope="row" className="whitespace-nowrap font-normal">
              {segmentTime(g)}
            </TH>
            <TD numeric>{formatErlangs(g.offeredTraffic)}</TD>
            <TD numeric className="font-semibold">
              {formatPercent(g.callCongestion?.estimate)}
            </TD>
            <TD numeric className={g.callCongestion ? "whitespace-nowrap" : "text-basin-600"}>
              {segmentInterval(g.callCongestion)}
            </TD>
            {references.map((r) => (
              <TD key={r.key} numeric>
                {formatPercent(g[r.key])}
              </TD>
            ))}
          </TR>
        ))}
      </TBody>
    </Table>
  );
}
