"use client";

import { chartColours, Plot } from "@/components/charts/plot";
import { formatPercent } from "@/lib/client/format";
import { erlangBTraffic } from "@/lib/client/verdict";
import { erlangBStateDistribution } from "@/lib/teletraffic";
import type { SimulationResult } from "@/lib/simulation";
import { chartedReferences, referenceColour, segmentChartData } from "./segment-chart-data";

const referenceLines = (result: SimulationResult, xs: [number, number]) =>
  chartedReferences(result).map((r, i) => ({
    type: "scatter" as const,
    mode: "lines" as const,
    name: r.method,
    x: xs,
    y: [r.callCongestion!, r.callCongestion!],
    line: { color: referenceColour(i), dash: i === 0 ? ("dash" as const) : ("dot" as const), width: 2 },
    hovertemplate: `${r.method}: %{y:.3%}<extra></extra>`,
  }));

/** Each replication's call congestion with the run's interval as a band and the references as lines. */
export function ReplicationChart({ result }: { result: SimulationResult }) {
  const y = result.perReplication.callCongestion;
  const x = y.map((_, i) => i + 1);
  const span: [number, number] = [0.5, y.length + 0.5];
  const cc = result.callCongestion;
  return (
    <Plot
      testId="chart-replications"
      title="Call congestion per replication"
      summary={`${y.length} replications; the pooled estimate is ${formatPercent(cc.estimate)} with interval ${formatPercent(cc.ciLow)} to ${formatPercent(cc.ciHigh)}; Erlang B gives ${formatPercent(result.references[0]?.callCongestion)}.`}
      xTitle="Replication"
      yTitle="Call congestion"
      layout={{ yaxis: { tickformat: ".2%", gridcolor: "#e2e8f0", title: { text: "Call congestion" } } }}
      data={[
        { type: "scatter", mode: "lines", x: span, y: [cc.ciHigh, cc.ciHigh], line: { width: 0 }, showlegend: false, hoverinfo: "skip" },
        { type: "scatter", mode: "lines", x: span, y: [cc.ciLow, cc.ciLow], fill: "tonexty", fillcolor: chartColours.band, line: { width: 0 }, name: `${Math.round(result.confidence * 100)} % interval`, hoverinfo: "skip" },
        { type: "scatter", mode: "markers", x, y, name: "Replication estimate", marker: { color: chartColours.simulated, size: 7 }, hovertemplate: "Replication %{x}: %{y:.3%}<extra></extra>" },
        ...referenceLines(result, span),
      ]}
    />
  );
}

/** The pooled estimate after each replication, converging on the final one. */
export function ConvergenceChart({ result }: { result: SimulationResult }) {
  const { callCongestion: ratios, calls } = result.perReplication;
  let blocked = 0;
  let total = 0;
  const running = ratios.map((r, i) => {
    blocked += r * calls[i];
    total += calls[i];
    return total > 0 ? blocked / total : 0;
  });
  const x = running.map((_, i) => i + 1);
  return (
    <Plot
      testId="chart-convergence"
      title="Running estimate"
      summary={`The pooled call congestion after each replication, ending at ${formatPercent(running[running.length - 1])}.`}
      xTitle="Replications pooled"
      yTitle="Call congestion"
      layout={{ yaxis: { tickformat: ".2%", gridcolor: "#e2e8f0", title: { text: "Call congestion" } } }}
      data={[
        { type: "scatter", mode: "lines+markers", x, y: running, name: "Pooled estimate", line: { color: chartColours.simulated, width: 2 }, hovertemplate: "%{x} replications: %{y:.3%}<extra></extra>" },
        ...referenceLines(result, [1, Math.max(1, running.length)]),
      ]}
    />
  );
}

/** Simulated time fraction at each number of busy circuits against the truncated Poisson (Erlang) law. */
export function OccupancyChart({ result, servers }: { result: SimulationResult; servers: number }) {
  const traffic = erlangBTraffic(result.references) ?? result.offeredTraffic;
  let poisson: number[] = [];
  try {
    poisson = erlangBStateDistribution(servers, traffic);
  } catch {
    poisson = [];
  }
  const x = result.occupancy.map((_, i) => i);
  return (
    <Plot
      testId="chart-occupancy"
      title="Busy circuits: simulated against the truncated Poisson law"
      summary={`Time fraction with 0 to ${servers} circuits busy. The last bar is the time congestion, ${formatPercent(result.timeCongestion.estimate)} simulated against ${formatPercent(poisson[servers])} for Poisson traffic.`}
      xTitle="Busy circuits"
      yTitle="Share of time"
      layout={{ bargap: 0.1, yaxis: { tickformat: ".1%", gridcolor: "#e2e8f0", title: { text: "Share of time" } } }}
      data={[
        { type: "bar", x, y: result.occupancy, name: "Simulated", marker: { color: chartColours.simulated }, hovertemplate: "%{x} busy: %{y:.3%}<extra></extra>" },
        {
          type: "scatter",
          mode: "lines+markers",
          x: poisson.map((_, i) => i),
          y: poisson,
          name: `Truncated Poisson at ${traffic.toPrecision(4)} E`,
          line: { color: chartColours.references[0], width: 2 },
          marker: { size: 4 },
          hovertemplate: "%{x} busy: %{y:.3%}<extra></extra>",
        },
      ]}
    />
  );
}

/** A time-varying run's call congestion per profile segment with its interval, the per-segment references and the offered traffic. */
export function SegmentChart({ result }: { result: SimulationResult }) {
  const chart = segmentChartData(result);
  if (!chart) return null;
  return <Plot testId="chart-segments" title="Call congestion through the load cycle" summary={chart.summary} height={380} layout={chart.layout} data={chart.data} />;
}
