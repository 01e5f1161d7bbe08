// How a run's figures were made, in words: shared by the run page and the printable report. Pure (no React, no
// "use client"), so server components can call it.
import { formatNumber, formatPercent } from "@/lib/client/format";
import type { SimulationResult } from "@/lib/simulation";
import type { WordLine } from "./scenario-words";

export const stopReasons: Record<SimulationResult["stopReason"], string> = {
  planned: "all planned replications ran",
  "precision-met": "the target precision was reached",
  "call-budget": "the call budget was used up before the target precision",
  "replication-limit": "the replication limit was reached before the target precision",
  cancelled: "the run was cancelled; the figures cover the chunks finished before",
};

const enginePaths: Record<NonNullable<SimulationResult["enginePath"]>, string> = {
  reference: "the general event loop",
  specialised: "the specialised loop for this arrival process",
  markov: "the Markov-chain path (jumps of the embedded chain)",
};

/** The simulation's own method notes: sample size, why it stopped, estimator, warm-up, interval. */
export function simulationNotes(result: SimulationResult): WordLine[] {
  const confidence = formatPercent(result.confidence);
  const lines: WordLine[] = [
    { label: "Sample", text: `${formatNumber(result.replications)} independent replications, ${formatNumber(result.calls)} fresh calls measured in all; stopped because ${stopReasons[result.stopReason]}` },
    {
      label: "Intervals",
      text: `${confidence} Student t intervals across replications; a probability's interval is clipped to 0–100 %${result.callCongestion.upperBoundOnly ? "; no refused call was seen, so the call congestion interval is a one-sided upper bound" : ""}`,
    },
    { label: "Call congestion estimator", text: result.callCongestion.method || "refused first attempts / fresh calls, pooled over replications" },
    { label: "Warm-up", text: `${formatNumber(result.warmupCalls.mean)} calls discarded per replication on average (from ${formatNumber(result.warmupCalls.min)} to ${formatNumber(result.warmupCalls.max)})` },
  ];
  if (result.enginePath) lines.push({ label: "Engine", text: `replications ran on ${enginePaths[result.enginePath]}` });
  return lines;
}
