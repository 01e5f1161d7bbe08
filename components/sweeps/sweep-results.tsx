"use client";

// What a finished (or finishing) sweep shows: the blocking curve with its band and the analytic curves, the sizing
// map of a grid, and a dimensioning search's answer. Each chart has a table beside it carrying the same figures,
// so nothing depends on seeing the picture or telling colours apart.
import Link from "next/link";
import { useId, useState } from "react";
import type { Data } from "plotly.js";
import { chartColours, Plot } from "@/components/charts/plot";
import { Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { JobStatusBadge } from "@/components/runs/status";
import { formatNumber, formatPercent } from "@/lib/client/format";
import { type DimensioningAnswer, type GridMap, type SweepCurve } from "@/lib/sweeps";
import { cellReading, dimensioningSentence, measureWords, parameterLabel } from "./sweep-text";


const interval = (e: { estimate: number; ciLow: number; ciHigh: number } | null) => (e ? `${formatPercent(e.ciLow)} – ${formatPercent(e.ciHigh)}` : "–");

function LogToggle({ value, onChange }: { value: boolean; onChange: (v: boolean) => void }) {
  const id = useId();
  return (
    <label htmlFor={id} className="flex items-center gap-2 text-sm text-basin-800 print:hidden">
      <input id={id} type="checkbox" checked={value} onChange={(e) => onChange(e.target.checked)} />
      Logarithmic blocking axis
    </label>
  );
}

export function SweepCurveView({ workspace, curve }: { workspace: string; curve: SweepCurve }) {
  const [log, setLog] = useState(false);
  const done = curve.points.filter((p) => p.callCongestion);
  const x = done.map((p) => p.value);
  const conf = curve.confidence ? `${Math.round(curve.confidence * 100)} %` : "confidence";
  const label = parameterLabel(curve.parameter);
  const first = done[0];
  const last = done[done.length - 1];
  const summary = done.length
    ? `Simulated call congestion at ${done.length} of ${curve.points.length} values of ${label.toLowerCase()}, from ${formatPercent(first.callCongestion!.estimate)} at ${formatNumber(first.value)} to ${formatPercent(last.callCongestion!.estimate)} at ${formatNumber(last.value)}, with the ${conf} band and ${curve.methods.length} analytic curve${curve.methods.length === 1 ? "" : "s"}. The table below gives every figure.`
    : "No point has finished yet.";
  return (
    <div className="flex flex-col gap-4">
      <LogToggle value={log} onChange={setLog} />
      <Plot
        testId="sweep-curve"
        title={`Call congestion against ${label.toLowerCase()}`}
        summary={summary}
        xTitle={label}
        yTitle="Call congestion"
        height={380}
        layout={{ yaxis: { type: log ? "log" : "linear", tickformat: log ? ".1e" : ".2%", gridcolor: "#e2e8f0", title: { text: "Call congestion" } } }}
        data={[
          { type: "scatter", mode: "lines", x, y: done.map((p) => p.callCongestion!.ciHigh), line: { width: 0 }, showlegend: false, hoverinfo: "skip" },
          { type: "scatter", mode: "lines", x, y: done.map((p) => Math.max(p.callCongestion!.ciLow, log ? 1e-9 : 0)), fill: "tonexty", fillcolor: chartColours.band, line: { width: 0 }, name: `${conf} interval`, hoverinfo: "skip" },
          {
            type: "scatter",
            mode: "lines+markers",
            x,
            y: done.map((p) => p.callCongestion!.estimate),
            name: "Simulated",
            line: { color: chartColours.simulated, width: 2 },
            marker: { size: 7, symbol: "circle" },
            hovertemplate: `${label} %{x}: %{y:.3%}<extra>Simulated</extra>`,
          },
          ...curve.methods.map((method, i) => ({
            type: "scatter" as const,
            mode: "lines+markers" as const,
            x: curve.points.map((p) => p.value),
            y: curve.points.map((p) => p.analytic[method] ?? null),
            name: method,
            connectgaps: false,
            line: { color: chartColours.references[i % chartColours.references.length], dash: (i === 0 ? "dash" : "dot") as "dash" | "dot", width: 2 },
            marker: { size: 6, symbol: ["diamond", "square", "triangle-up", "x", "cross", "star"][i % 6] },
            hovertemplate: `${label} %{x}: %{y:.3%}<extra>${method}</extra>`,
          }) as Data),
        ]}
      />
      <div className="overflow-x-auto">
        <Table>
          <caption className="sr-only">Every point of the sweep: simulated call congestion with its interval beside each analytic method</caption>
          <THead>
            <TR>
              <TH numeric>{label}</TH>
              <TH>Status</TH>
              <TH numeric>Simulated</TH>
              <TH numeric>{conf} interval</TH>
              {curve.methods.map((m) => (
                <TH key={m} numeric>
                  {m}
                </TH>
              ))}
              <TH>Run</TH>
            </TR>
          </THead>
          <TBody>
            {curve.points.map((p) => (
              <TR key={p.point} data-testid="curve-point">
                <TH scope="row" numeric>
                  {formatNumber(p.value)}
                </TH>
                <TD>
                  <JobStatusBadge status={p.status} partial={p.partial} />
                </TD>
                <TD numeric className="font-semibold">
                  {formatPercent(p.callCongestion?.estimate)}
                </TD>
                <TD numeric className="whitespace-nowrap">
                  {interval(p.callCongestion)}
                </TD>
                {curve.methods.map((m) => (
                  <TD key={m} numeric>
                    {formatPercent(p.analytic[m])}
                  </TD>
                ))}
                <TD>
                  <Link className="text-basin-800 underline" href={`/w/${workspace}/runs/${p.runId}`}>
                    Open<span className="sr-only"> the run at {formatNumber(p.value)}</span>
                  </Link>
                </TD>
              </TR>
            ))}
          </TBody>
        </Table>
      </div>
    </div>
  );
}

const cellTones: Record<ReturnType<typeof cellReading>["tone"], string> = {
  holds: "bg-emerald-50 text-emerald-900 border-emerald-300",
  breaks: "bg-red-50 text-red-900 border-red-300",
  inconclusive: "bg-spill-50 text-basin-950 border-spill-300",
  pending: "bg-white text-basin-700 border-basin-200",
  failed: "bg-white text-red-800 border-red-300 border-dashed",
};

/**
 * The sizing map: rows are the y values, columns the x values; each cell says in words whether the formula's group
 * holds the target under the simulated traffic, with the margin in percentage points and the group size.
 */
export function SizingMap({ workspace, map }: { workspace: string; map: GridMap }) {
  const xLabel = parameterLabel(map.x.parameter);
  const yLabel = parameterLabel(map.y.parameter);
  const byPosition = new Map(map.cells.map((c) => [`${c.x}|${c.y}`, c]));
  const total = map.x.values.length * map.y.values.length;
  return (
    <div className="flex flex-col gap-3">
      <p className="text-sm text-basin-800" data-testid="map-counts">
        {map.formula} sizes each cell&apos;s group for {formatPercent(map.targetBlocking)} {measureWords[map.measure]}. Under the simulated traffic the sizing holds in{" "}
        <strong>{map.counts.holds}</strong>, breaks in <strong>{map.counts.breaks}</strong> and is too close to call in <strong>{map.counts.inconclusive}</strong> of {total} cells.
      </p>
      <div className="overflow-x-auto">
        <table className="border-separate border-spacing-1 text-sm" data-testid="sizing-map">
          <caption className="mb-2 text-left text-xs text-basin-700">
            Rows: {yLabel}. Columns: {xLabel}. Each cell: verdict, margin against the target (spare or over), and the group {map.formula} installs.
          </caption>
          <thead>
            <tr>
              <th scope="col" className="px-2 py-1 text-left text-xs font-medium text-basin-700">
                {yLabel} ↓ / {xLabel} →
              </th>
              {map.x.values.map((xv) => (
                <th key={xv} scope="col" className="px-2 py-1 text-right text-xs font-semibold tabular-nums text-basin-900">
                  {formatNumber(xv)}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {map.y.values.map((yv) => (
              <tr key={yv}>
                <th scope="row" className="px-2 py-1 text-right text-xs font-semibold tabular-nums text-basin-900">
                  {formatNumber(yv)}
                </th>
                {map.x.values.map((xv) => {
                  const cell = byPosition.get(`${xv}|${yv}`);
                  if (!cell)
                    return (
                      <td key={xv} className="min-w-28 rounded border border-basin-200 px-2 py-1 text-basin-700">
                        Not planned
                      </td>
                    );
                  const r = cellReading(cell);
                  return (
                    <td key={xv} className={`min-w-28 rounded border px-2 py-1.5 align-top ${cellTones[r.tone]}`} data-testid="map-cell" data-verdict={cell.verdict ?? cell.status}>
                      <Link href={`/w/${workspace}/runs/${cell.runId}`} className="block underline-offset-2 hover:underline">
                        <span className="font-semibold">
                          <span aria-hidden="true">{r.symbol} </span>
                          {r.word}
                        </span>
                        {r.margin && r.tone !== "failed" && <span className="block tabular-nums">{r.margin}</span>}
                        <span className="block text-xs tabular-nums">
                          N = {cell.servers}
                          {cell.estimate ? ` · ${formatPercent(cell.estimate.estimate)}` : ""}
                        </span>
                        <span className="sr-only">
                          {" "}
                          at {xLabel} {formatNumber(xv)}, {yLabel} {formatNumber(yv)}
                        </span>
                      </Link>
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <ul className="flex flex-wrap gap-4 text-xs text-basin-800" aria-label="How to read the map">
        <li>
          <span aria-hidden="true">✓ </span>Holds: the whole interval is at or below the target
        </li>
        <li>
          <span aria-hidden="true">✗ </span>Breaks: the whole interval is above it
        </li>
        <li>
          <span aria-hidden="true">≈ </span>Too close: the interval straddles the target
        </li>
      </ul>
    </div>
  );
}

export function DimensioningView({ workspace, answer, live }: { workspace: string; answer: DimensioningAnswer; live: boolean }) {
  const probes = [...answer.probes].sort((a, b) => a.servers - b.servers);
  const done = probes.filter((p) => p.estimate);
  const measure = measureWords[answer.measure];
  const xs = probes.map((p) => p.servers);
  const span: [number, number] = [Math.min(...xs, answer.formula.servers) - 0.5, Math.max(...xs, answer.formula.servers) + 0.5];
  return (
    <div className="flex flex-col gap-4">
      <p className="text-base text-basin-950" data-testid="dimensioning-answer">
        {dimensioningSentence(answer, live)}
      </p>
      {done.length > 0 && (
        <Plot
          testId="dimensioning-chart"
          title={`Simulated ${measure} at each group size probed`}
          summary={`${done.length} probes between ${probes[0].servers} and ${probes[probes.length - 1].servers} servers, with their intervals against the ${formatPercent(answer.targetBlocking)} target; ${answer.formula.method} installs ${answer.formula.servers}.`}
          xTitle="Servers"
          yTitle={measure[0].toUpperCase() + measure.slice(1)}
          layout={{ yaxis: { tickformat: ".2%", gridcolor: "#e2e8f0", title: { text: measure } }, xaxis: { dtick: 1, gridcolor: "#e2e8f0", title: { text: "Servers" } } }}
          data={[
            {
              type: "scatter",
              mode: "markers",
              x: done.map((p) => p.servers),
              y: done.map((p) => p.estimate!.estimate),
              error_y: { type: "data", symmetric: false, array: done.map((p) => p.estimate!.ciHigh - p.estimate!.estimate), arrayminus: done.map((p) => p.estimate!.estimate - p.estimate!.ciLow), color: chartColours.simulated },
              marker: { color: chartColours.simulated, size: 8, symbol: done.map((p) => (p.meets ? "circle" : "x")) },
              name: "Simulated, with interval",
              hovertemplate: "%{x} servers: %{y:.3%}<extra></extra>",
            },
            { type: "scatter", mode: "lines", x: span, y: [answer.targetBlocking, answer.targetBlocking], name: "Target", line: { color: chartColours.target, dash: "dash", width: 2 } },
            {
              type: "scatter",
              mode: "markers",
              x: [answer.formula.servers],
              y: [answer.targetBlocking],
              name: `${answer.formula.method} group`,
              marker: { color: chartColours.references[0], size: 12, symbol: "diamond" },
              hovertemplate: `${answer.formula.method}: %{x} servers<extra></extra>`,
            },
          ]}
        />
      )}
      <div className="overflow-x-auto">
        <Table>
          <caption className="sr-only">Every group size the search simulated</caption>
          <THead>
            <TR>
              <TH numeric>Servers</TH>
              <TH>Status</TH>
              <TH numeric>Simulated {measure}</TH>
              <TH numeric>Interval</TH>
              <TH>Meets the target?</TH>
              <TH>Run</TH>
            </TR>
          </THead>
          <TBody>
            {probes.map((p) => (
              <TR key={p.point} data-testid="probe">
                <TH scope="row" numeric>
                  {p.servers}
                  {p.servers === answer.formula.servers ? <span className="ml-1 text-xs font-normal text-basin-700">(formula)</span> : null}
                </TH>
                <TD>
                  <JobStatusBadge status={p.status} />
                </TD>
                <TD numeric>{formatPercent(p.estimate?.estimate)}</TD>
                <TD numeric className="whitespace-nowrap">
                  {interval(p.estimate)}
                </TD>
                <TD>{p.meets === null ? "–" : p.meets ? "Yes, on its upper bound" : "No"}</TD>
                <TD>
                  <Link className="text-basin-800 underline" href={`/w/${workspace}/runs/${p.runId}`}>
                    Open<span className="sr-only"> the probe at {p.servers} servers</span>
                  </Link>
                </TD>
              </TR>
            ))}
          </TBody>
        </Table>
      </div>
    </div>
  );
}
