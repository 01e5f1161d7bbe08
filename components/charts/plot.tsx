"use client";

// The one way Spillway draws a chart: Plotly, loaded only in the browser (it touches `self` on import) and only when
// a chart is on screen. The box keeps its height while Plotly loads, so nothing below it moves.
import dynamic from "next/dynamic";
import type { Data, Layout } from "plotly.js";
import { Skeleton } from "@/components/ui";

const PlotlyChart = dynamic(
  async () => {
    const [{ default: createPlotlyComponent }, plotly] = await Promise.all([import("react-plotly.js/factory"), import("plotly.js-dist-min")]);
    return createPlotlyComponent((plotly as { default?: unknown }).default ?? plotly);
  },
  { ssr: false, loading: () => <Skeleton className="h-full w-full" /> },
);

export interface PlotProps {
  data: Data[];
  /** Accessible name of the chart; also its visible title unless `layout.title` is given. */
  title: string;
  /** One or two sentences a screen reader gets instead of the picture (what the chart shows and its main reading). */
  summary: string;
  xTitle?: string;
  yTitle?: string;
  layout?: Partial<Layout>;
  height?: number;
  testId?: string;
}

/** Spillway's chart palette: basin blues for simulated figures, spill ambers for references, red for targets. */
export const chartColours = {
  simulated: "#1d4f7a",
  band: "rgba(29, 79, 122, 0.15)",
  references: ["#b45309", "#7c3aed", "#0f766e", "#be185d", "#4d7c0f", "#9a3412"],
  target: "#b91c1c",
  holds: "#047857",
  breaks: "#b91c1c",
} as const;

export function Plot({ data, title, summary, xTitle, yTitle, layout, height = 320, testId }: PlotProps) {
  return (
    // Named as a figure, not role="img": Plotly's toolbar buttons inside must stay reachable (an img's children are
    // presentational, so axe reports them as nested-interactive). The caption gives the reading in words.
    <figure className="w-full" data-testid={testId} aria-label={title}>
      <div style={{ height }} className="w-full">
        <PlotlyChart
          data={data}
          layout={{
            autosize: true,
            height,
            margin: { l: 64, r: 16, t: 36, b: 52 },
            font: { family: "Inter, system-ui, sans-serif", size: 12, color: "#0c2238" },
            title: { text: title, font: { size: 14 } },
            xaxis: { title: { text: xTitle ?? "" }, gridcolor: "#e2e8f0", zeroline: false },
            yaxis: { title: { text: yTitle ?? "" }, gridcolor: "#e2e8f0", zeroline: false },
            legend: { orientation: "h", y: -0.25 },
            paper_bgcolor: "rgba(0,0,0,0)",
            plot_bgcolor: "rgba(0,0,0,0)",
            ...layout,
          }}
          config={{ displaylogo: false, responsive: true, modeBarButtonsToRemove: ["select2d", "lasso2d"] }}
          useResizeHandler
          style={{ width: "100%", height: "100%" }}
        />
      </div>
      <figcaption className="sr-only">{summary}</figcaption>
    </figure>
  );
}
