// The per-segment picture of a time-varying run (components/runs/segment-chart-data.ts, segment-words.ts,
// segment-table.tsx) and the report link that carries the page's target (components/runs/target-control.tsx), on a
// hand-made result whose figures are chosen here, so every expected value is written out below.
import { createElement as h } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { chartColours } from "@/components/charts/plot";
import { chartedReferences, intervalBoxes, segmentChartData, steps } from "@/components/runs/segment-chart-data";
import type { Segment } from "@/components/runs/segment-words";
import { SegmentTable } from "@/components/runs/segment-table";
import { withTarget } from "@/components/runs/target-control";
import { DEFAULT_TARGET_GOS } from "@/lib/client/verdict";
import type { Reference, SimulationResult } from "@/lib/simulation";

const ci = (estimate: number, ciLow: number, ciHigh: number) => ({ estimate, standardError: (ciHigh - ciLow) / 4, halfWidth: (ciHigh - ciLow) / 2, ciLow, ciHigh });
const segment = (index: number, start: number, end: number, rate: number, cc: ReturnType<typeof ci> | undefined, refs: Partial<Record<"exact" | "psa" | "mol", number>>): Segment => ({
  index,
  start,
  end,
  rate,
  offeredTraffic: rate,
  calls: rate * 100,
  refused: cc ? Math.round(cc.estimate * rate * 100) : 0,
  time: (end - start) * 100,
  timeCongestion: ci(0.05, 0.04, 0.06),
  ...(cc ? { callCongestion: cc } : {}),
  ...refs,
});
const segments: Segment[] = [
  segment(0, 0, 2, 2, ci(0.03, 0.01, 0.05), { exact: 0.024, psa: 0.037, mol: 0.034 }),
  segment(1, 2, 3, 7, ci(0.26, 0.23, 0.29), { exact: 0.25, psa: 0.42, mol: 0.18 }),
  segment(2, 3, 4, 0, undefined, { exact: 0.077, psa: 0, mol: 0.14 }),
];
const ref = (method: string, callCongestion?: number): Reference => ({ method, assumptions: "", exact: false, ...(callCongestion === undefined ? { unavailable: "no" } : { callCongestion }) }) as Reference;
const references = [
  ref("Erlang B", 0.089),
  ref("Some unavailable method"),
  ref("M(t)/M/N/N periodic exact solution", 0.168),
  ref("pointwise stationary approximation", 0.284),
  ref("modified offered load approximation", 0.13),
];
const result = { confidence: 0.95, segments, references } as unknown as SimulationResult;
type Trace = { name?: string; x: (number | null)[]; y: (number | null)[]; yaxis?: string; fill?: string; line?: { color?: string; dash?: string } };

describe("per-segment chart data", () => {
  it("holds each value over its segment as steps and leaves a gap where a segment has none", () => {
    expect(steps(segments, (g) => g.callCongestion?.estimate)).toEqual({ x: [0, 2, 2, 3, 3], y: [0.03, 0.03, 0.26, 0.26, null] });
    expect(steps(segments, (g) => g.offeredTraffic)).toEqual({ x: [0, 2, 2, 3, 3, 4], y: [2, 2, 7, 7, 0, 0] });
    // A gap in the middle: the line stops at the end of the first segment and starts again at the third.
    const middle = [segments[0], segments[2], segments[1]];
    expect(steps(middle, (g) => g.callCongestion?.estimate)).toEqual({ x: [0, 2, 3, 2, 3], y: [0.03, 0.03, null, 0.26, 0.26] });
  });

  it("draws the interval as one closed box per segment with calls, separated by gaps", () => {
    expect(intervalBoxes(segments)).toEqual({
      x: [0, 2, 2, 0, 0, null, 2, 3, 3, 2, 2],
      y: [0.01, 0.01, 0.05, 0.05, 0.01, null, 0.23, 0.23, 0.29, 0.29, 0.23],
    });
  });

  it("puts the simulated steps, the three references and the offered traffic on the right axis, in the run charts' colours", () => {
    const chart = segmentChartData(result)!;
    const traces = chart.data as unknown as Trace[];
    expect(traces.map((t) => t.name)).toEqual(["95 % interval", "Simulated", "Simulated, segment mid-point", "Exact periodic", "PSA", "MOL", "Offered traffic (right axis)"]);
    expect(traces[0].fill).toBe("toself");
    expect(traces[2].x).toEqual([1, 2.5]);
    expect(traces[3].y).toEqual([0.024, 0.024, 0.25, 0.25, 0.077, 0.077]);
    expect(traces[5].y).toEqual([0.034, 0.034, 0.18, 0.18, 0.14, 0.14]);
    expect(traces[6].yaxis).toBe("y2");
    expect(traces.filter((t) => t.yaxis === "y2")).toHaveLength(1);
    // Colours follow the position among the charted references (unavailable ones skipped), as in the other run charts.
    expect(chartedReferences(result).map((r) => r.method)[1]).toBe("M(t)/M/N/N periodic exact solution");
    expect(traces.slice(3, 6).map((t) => t.line?.color)).toEqual([chartColours.references[1], chartColours.references[2], chartColours.references[3]]);
    // Told apart without colour too.
    expect(new Set(traces.slice(3, 6).map((t) => t.line?.dash)).size).toBe(3);
    expect(chart.layout.yaxis2).toMatchObject({ overlaying: "y", side: "right" });
    expect(chart.layout.xaxis?.range).toEqual([0, 4]);
  });

  it("summarises the chart in words: segments, cycle, references, load range and the worst segment", () => {
    const { summary } = segmentChartData(result)!;
    expect(summary).toContain("each of the 3 segments of the load profile (a cycle of 4 time units) with its 95 % interval");
    expect(summary).toContain("beside the exact periodic solution, PSA (pointwise stationary approximation) and MOL (modified offered load)");
    expect(summary).toContain("offered traffic from 0 E to 7 E on the right axis");
    expect(summary).toContain("Highest simulated value: 26 % in 2 – 3 (23 % – 29 %), where the exact periodic solution gives 25 %.");
  });

  it("leaves out what the run does not have", () => {
    expect(segmentChartData({ ...result, segments: undefined } as SimulationResult)).toBeNull();
    const onlyPsa = segments.map(({ exact: _e, mol: _m, ...g }) => g as Segment);
    const chart = segmentChartData({ ...result, segments: onlyPsa } as SimulationResult)!;
    expect((chart.data as unknown as Trace[]).map((t) => t.name)).toEqual(["95 % interval", "Simulated", "Simulated, segment mid-point", "PSA", "Offered traffic (right axis)"]);
    expect(chart.summary).toContain("where PSA (pointwise stationary approximation) gives 42 %");
    const none = segments.map(({ exact: _e, mol: _m, psa: _p, ...g }) => g as Segment);
    expect(segmentChartData({ ...result, segments: none } as SimulationResult)!.summary).toContain("with no analytic per-segment value for this scenario");
  });
});

describe("per-segment table", () => {
  const html = renderToStaticMarkup(h(SegmentTable, { result }));
  const rows = html.split('data-testid="segment-row"').slice(1);

  it("has one row per segment with its time, load, estimate, interval and each reference", () => {
    expect(rows).toHaveLength(3);
    for (const head of ["Time in the cycle", "Offered traffic", "Simulated", "95 % interval", "Exact periodic", "PSA", "MOL"]) expect(html).toContain(head);
    expect(rows[1]).toContain(">2 – 3</th>");
    expect(rows[1]).toContain(">7 E<");
    expect(rows[1]).toContain(">26 %<");
    expect(rows[1]).toContain(">23 % – 29 %<");
    expect(rows[1]).toMatch(/>25 %<.*>42 %<.*>18 %</);
    // No call is offered in the empty segment, so it has no estimate; the references still show.
    expect(rows[2]).toContain("no calls offered");
    expect(rows[2]).toMatch(/>7\.7 %<.*>0 %<.*>14 %</);
  });

  it("says a one-sided bound as such and renders nothing without segments", () => {
    const bound = segments.map((g, i) => (i === 0 ? { ...g, callCongestion: { ...ci(0, 0, 0.002), upperBoundOnly: true } } : g));
    expect(renderToStaticMarkup(h(SegmentTable, { result: { ...result, segments: bound } as SimulationResult }))).toContain("below 0.2 % (none refused)");
    expect(renderToStaticMarkup(h(SegmentTable, { result: { ...result, segments: undefined } as SimulationResult }))).toBe("");
  });
});

describe("report link with the target", () => {
  it("carries a chosen target and leaves the default out, as the target control keeps the address", () => {
    expect(withTarget("/w/ws/runs/1/report", DEFAULT_TARGET_GOS)).toBe("/w/ws/runs/1/report");
    expect(withTarget("/w/ws/runs/1/report", 0.005)).toBe("/w/ws/runs/1/report?gos=0.005");
    expect(withTarget("/w/ws/sweeps/2/report?x=1", 0.02)).toBe("/w/ws/sweeps/2/report?x=1&gos=0.02");
  });
});
