// A time-varying run's profile segments in words and numbers, shared by the per-segment chart and its table. Pure and
// free of client modules, so the server-rendered report can use it.
import { formatNumber, formatPercent } from "@/lib/client/format";
import type { SimulationResult } from "@/lib/simulation";
import { TIME_VARYING_METHODS } from "@/lib/simulation/references";

export type Segment = NonNullable<SimulationResult["segments"]>[number];
type Interval = NonNullable<Segment["callCongestion"]>;

/** The per-segment analytic values the engine attaches, in the order the table lists them. */
export const segmentReferences = [
  { key: "exact", method: TIME_VARYING_METHODS.periodic, label: "Exact periodic", long: "the exact periodic solution", dash: "dash" },
  { key: "psa", method: TIME_VARYING_METHODS.pointwise, label: "PSA", long: "PSA (pointwise stationary approximation)", dash: "dot" },
  { key: "mol", method: TIME_VARYING_METHODS.modifiedLoad, label: "MOL", long: "MOL (modified offered load)", dash: "dashdot" },
] as const;
export type SegmentReference = (typeof segmentReferences)[number];

/** The per-segment references this result carries (a value in at least one segment). */
export const presentReferences = (segments: Segment[]): SegmentReference[] => segmentReferences.filter((r) => segments.some((g) => g[r.key] !== undefined));

export const segmentTime = (g: Pick<Segment, "start" | "end">) => `${formatNumber(g.start)} – ${formatNumber(g.end)}`;

/** "1.2 % – 3.4 %", or the one-sided bound when the segment saw no refusal. */
export function segmentInterval(ci: Interval | undefined): string {
  if (!ci) return "no calls offered";
  return ci.upperBoundOnly ? `below ${formatPercent(ci.ciHigh)} (none refused)` : `${formatPercent(ci.ciLow)} – ${formatPercent(ci.ciHigh)}`;
}
