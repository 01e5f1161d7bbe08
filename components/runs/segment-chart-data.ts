// The per-segment picture of a time-varying run, as plain data: the simulated call congestion of each profile
// segment with its interval, the exact periodic value, PSA and MOL as steps over the cycle, and the offered traffic on
// a second axis. Pure data (no React, no Plotly at run time) for the client run charts and the tests; it reads the
// chart palette from the client-only wrapper, so server components use ./segment-words instead.
import type { Data, Layout } from "plotly.js";
import { chartColours } from "@/components/charts/plot";
import { formatErlangs, formatNumber, formatPercent } from "@/lib/client/format";
import type { SimulationResult } from "@/lib/simulation";
import { presentReferences, segmentInterval, segmentReferences, segmentTime, type Segment, type SegmentReference } from "./segment-words";

/** The references a chart draws as lines, and the line style of the i-th: the run charts share it so colours match. */
export const chartedReferences = (result: SimulationResult) => result.references.filter((r) => typeof r.callCongestion === "number");
export const referenceColour = (i: number) => chartColours.references[i % chartColours.references.length];

/**
 * A value held over each segment as a polyline: (start, v), (end, v) per segment, so consecutive segments join with
 * a vertical step; a segment without a value leaves a gap (null), never a line through it.
 */
export function steps(segments: Segment[], value: (g: Segment) => number | undefined): { x: number[]; y: (number | null)[] } {
  const x: number[] = [];
  const y: (number | null)[] = [];
  for (const g of segments) {
    const v = value(g);
    if (v === undefined || !Number.isFinite(v)) {
      if (y.length && y[y.length - 1] !== null) {
        x.push(g.start);
        y.push(null);
      }
      continue;
    }
    x.push(g.start, g.end);
    y.push(v, v);
  }
  return { x, y };
}

/** One closed rectangle per segment from ciLow to ciHigh, separated by nulls: Plotly fills each part of a "toself" trace on its own. */
export function intervalBoxes(segments: Segment[]): { x: (number | null)[]; y: (number | null)[] } {
  const x: (number | null)[] = [];
  const y: (number | null)[] = [];
  for (const g of segments) {
    const ci = g.callCongestion;
    if (!ci) continue;
    if (x.length) {
      x.push(null);
      y.push(null);
    }
    x.push(g.start, g.end, g.end, g.start, g.start);
    y.push(ci.ciLow, ci.ciLow, ci.ciHigh, ci.ciHigh, ci.ciLow);
  }
  return { x, y };
}

export interface SegmentChartData {
  data: Data[];
  layout: Partial<Layout>;
  summary: string;
}

/** Traces, layout and the screen-reader summary of the per-segment chart; null when the run has no segments. */
export function segmentChartData(result: SimulationResult): SegmentChartData | null {
  const segments = result.segments;
  if (!segments?.length) return null;
  const conf = `${Math.round(result.confidence * 100)} %`;
  const charted = chartedReferences(result);
  const present = presentReferences(segments);
  const simulated = segments.filter((g) => g.callCongestion);
  const boxes = intervalBoxes(segments);
  const estimate = steps(segments, (g) => g.callCongestion?.estimate);
  const offered = steps(segments, (g) => g.offeredTraffic);
  const data: Data[] = [
    {
      type: "scatter",
      mode: "lines",
      x: boxes.x,
      y: boxes.y,
      fill: "toself",
      fillcolor: chartColours.band,
      line: { width: 0 },
      name: `${conf} interval`,
      hoverinfo: "skip",
    },
    { type: "scatter", mode: "lines", x: estimate.x, y: estimate.y, name: "Simulated", line: { color: chartColours.simulated, width: 2.5 }, connectgaps: false, hoverinfo: "skip" },
    {
      // Markers at the middle of each segment carry the hover text (and keep the estimate visible in a short segment).
      type: "scatter",
      mode: "markers",
      x: simulated.map((g) => (g.start + g.end) / 2),
      y: simulated.map((g) => g.callCongestion!.estimate),
      text: simulated.map((g) => `${segmentTime(g)}: ${formatPercent(g.callCongestion!.estimate)} (${segmentInterval(g.callCongestion)})`),
      name: "Simulated, segment mid-point",
      showlegend: false,
      marker: { color: chartColours.simulated, size: 6 },
      hovertemplate: "%{text}<extra>Simulated</extra>",
    },
    ...present.map((r): Data => {
      const line = steps(segments, (g) => g[r.key]);
      const i = charted.findIndex((c) => c.method === r.method);
      return {
        type: "scatter",
        mode: "lines",
        x: line.x,
        y: line.y,
        name: r.label,
        connectgaps: false,
        line: { color: referenceColour(i < 0 ? segmentReferences.indexOf(r) + 1 : i), dash: r.dash, width: 2 },
        hovertemplate: `${r.label}: %{y:.3%}<extra></extra>`,
      };
    }),
    {
      type: "scatter",
      mode: "lines",
      x: offered.x,
      y: offered.y,
      yaxis: "y2",
      name: "Offered traffic (right axis)",
      line: { color: "#64748b", width: 1.5, dash: "longdash" },
      hovertemplate: "%{y:.4g} E offered<extra></extra>",
    },
  ];
  const grid = "#e2e8f0";
  const layout: Partial<Layout> = {
    margin: { l: 64, r: 64, t: 36, b: 52 },
    xaxis: { title: { text: "Time in the cycle" }, gridcolor: grid, zeroline: false, range: [segments[0].start, segments[segments.length - 1].end] },
    yaxis: { title: { text: "Call congestion" }, tickformat: ".2%", gridcolor: grid, zeroline: false, rangemode: "tozero" },
    yaxis2: { title: { text: "Offered traffic (E)" }, overlaying: "y", side: "right", showgrid: false, zeroline: false, rangemode: "tozero" },
  };
  return { data, layout, summary: segmentSummary(result, segments, present) };
}

function segmentSummary(result: SimulationResult, segments: Segment[], present: SegmentReference[]): string {
  const conf = `${Math.round(result.confidence * 100)} %`;
  const cycle = segments[segments.length - 1].end - segments[0].start;
  const loads = segments.map((g) => g.offeredTraffic);
  const beside = present.length ? `beside ${present.map((r) => r.long).join(", ").replace(/, ([^,]*)$/, " and $1")}` : "with no analytic per-segment value for this scenario";
  const parts = [
    `Simulated call congestion in each of the ${segments.length} segments of the load profile (a cycle of ${formatNumber(cycle)} time units) with its ${conf} interval, ${beside}; offered traffic from ${formatErlangs(Math.min(...loads))} to ${formatErlangs(Math.max(...loads))} on the right axis.`,
  ];
  const withCalls = segments.filter((g) => g.callCongestion);
  if (withCalls.length) {
    const top = withCalls.reduce((a, b) => (b.callCongestion!.estimate > a.callCongestion!.estimate ? b : a));
    const ref = present.find((r) => top[r.key] !== undefined);
    parts.push(
      `Highest simulated value: ${formatPercent(top.callCongestion!.estimate)} in ${segmentTime(top)} (${segmentInterval(top.callCongestion)})${ref ? `, where ${ref.long} gives ${formatPercent(top[ref.key])}` : ""}.`,
    );
  }
  parts.push("The table below gives every figure.");
  return parts.join(" ");
}
