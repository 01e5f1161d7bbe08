// Words and numbers of the sweep pages, pure so they are unit-tested: the value lists a researcher types, the
// dimensioning answer in one sentence, and the sizing map's cell reading.
import { formatPercent, formatPoints } from "@/lib/client/format";
import type { SweepKind } from "@/lib/jobs/api-types";
import { sweepParameters, type DimensioningAnswer, type GridCell } from "@/lib/sweeps";

export const sweepKindLabels: Record<SweepKind, string> = {
  sweep: "Sweep",
  grid: "Sizing map",
  dimensioning: "Dimensioning search",
};

/** A parameter's label with its unit ("Offered traffic (E)"); the servers of a grid cell are "Servers". */
export function parameterLabel(name: string): string {
  const p = (sweepParameters as Record<string, { label: string; unit: string } | undefined>)[name];
  return p ? `${p.label}${p.unit && p.unit !== "time units" ? ` (${p.unit})` : ""}` : name;
}

export const measureWords: Record<"callCongestion" | "timeCongestion", string> = {
  callCongestion: "call congestion",
  timeCongestion: "time congestion",
};

/**
 * Values for one axis: a list ("10, 12.5, 15" — commas, semicolons or spaces) or a stepped range "from:to:step"
 * ("10:20:2" = 10, 12, …, 20). Errors say what is wrong in the researcher's own terms.
 */
export function parseValueList(text: string, maxValues = 121): { values: number[] } | { error: string } {
  const trimmed = text.trim();
  if (!trimmed) return { error: "Enter at least one value." };
  const range = /^(-?[\d.eE+-]+)\s*:\s*(-?[\d.eE+-]+)\s*:\s*([\d.eE+-]+)$/.exec(trimmed);
  if (range) {
    const [from, to, step] = range.slice(1).map(Number);
    if (![from, to, step].every(Number.isFinite)) return { error: "A range is from:to:step with three numbers, e.g. 10:20:2." };
    if (step <= 0) return { error: "The step of a range must be > 0." };
    if (to < from) return { error: "A range must end at or above where it starts." };
    const count = Math.floor((to - from) / step + 1e-9) + 1;
    if (count > maxValues) return { error: `That range has ${count} values; at most ${maxValues}.` };
    // Round to the step's own decimals so 0.1 steps do not print as 0.30000000000000004.
    const decimals = Math.max(decimalsOf(from), decimalsOf(step));
    return { values: Array.from({ length: count }, (_, i) => Number((from + i * step).toFixed(decimals))) };
  }
  const parts = trimmed.split(/[\s,;]+/).filter(Boolean);
  const values: number[] = [];
  for (const part of parts) {
    const v = Number(part);
    if (!Number.isFinite(v)) return { error: `"${part}" is not a number.` };
    values.push(v);
  }
  if (values.length > maxValues) return { error: `${values.length} values; at most ${maxValues}.` };
  return { values };
}

function decimalsOf(x: number): number {
  const s = String(x);
  if (s.includes("e")) return 10;
  const dot = s.indexOf(".");
  return dot < 0 ? 0 : s.length - dot - 1;
}

const servers = (n: number) => `${n} server${n === 1 ? "" : "s"}`;

/**
 * The dimensioning answer in one sentence: simulated N against the formula's N, with the bound that decided it.
 * `live` while the search is still probing (no answer yet).
 */
export function dimensioningSentence(answer: DimensioningAnswer | null, live: boolean, fallback?: { target: number; measure: "callCongestion" | "timeCongestion" }): string {
  if (!answer) {
    const goal = fallback ? ` for ${measureWords[fallback.measure]} at or below ${formatPercent(fallback.target)}` : "";
    return live ? `Searching for the smallest group${goal}; the answer appears when the probes have settled it.` : `The search ended without an answer${goal}.`;
  }
  const measure = measureWords[answer.measure];
  const bound = answer.confidence ? `the upper ${Math.round(answer.confidence * 100)} % confidence bound` : "the upper confidence bound";
  const formula = `${answer.formula.method} installs ${servers(answer.formula.servers)} at the same mean load`;
  if (!answer.simulated || answer.difference === null) {
    return `The search stopped without an answer (${answer.unresolved ?? "no probe met the target"}); ${formula} for ${formatPercent(answer.targetBlocking)} ${measure}.`;
  }
  const need = `To keep ${measure} at or below ${formatPercent(answer.targetBlocking)} (${bound} ${formatPercent(answer.simulated.estimate.ciHigh)}), this traffic needs ${servers(answer.simulated.servers)} by simulation`;
  const d = answer.difference;
  if (d === 0) return `${need}, exactly what ${formula}: the formula's sizing holds.`;
  return d > 0
    ? `${need}, while ${formula}: the formula under-sizes this traffic by ${servers(d)}.`
    : `${need}, while ${formula}: the formula over-sizes this traffic by ${servers(-d)}.`;
}

export interface CellReading {
  /** Word shown in the cell (the verdict readable without colour). */
  word: string;
  /** Symbol shown before the word (decorative; the word carries the meaning). */
  symbol: string;
  tone: "holds" | "breaks" | "inconclusive" | "pending" | "failed";
  /** Spare or excess grade of service, in percentage points against the target. */
  margin: string;
}

export function cellReading(cell: GridCell): CellReading {
  if (cell.status === "failed") return { word: "Failed", symbol: "!", tone: "failed", margin: cell.error ?? "" };
  if (!cell.verdict || cell.margin === null) return { word: cell.status === "cancelled" ? "Cancelled" : "Pending", symbol: "…", tone: "pending", margin: "" };
  const margin = cell.margin >= 0 ? `${formatPoints(cell.margin).replace(/^\+/, "")} spare` : `${formatPoints(-cell.margin).replace(/^\+/, "")} over`;
  switch (cell.verdict) {
    case "holds":
      return { word: "Holds", symbol: "✓", tone: "holds", margin };
    case "breaks":
      return { word: "Breaks", symbol: "✗", tone: "breaks", margin };
    case "inconclusive":
      return { word: "Too close", symbol: "≈", tone: "inconclusive", margin };
  }
}
