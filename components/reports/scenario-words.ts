// A scenario (and a sweep's definition) in plain words for the printable reports: one labelled line per part,
// with the editor's own labels for processes and laws. Pure, so it renders on the server and is unit-testable.
import { formatErlangs, formatNumber, formatPercent } from "@/lib/client/format";
import { arrivalProcesses, batchSizeSpecs, lawForm, lawSpecs } from "@/lib/client/scenario-form";
import { lawMean, offeredTraffic, parseScenario, type BatchSizeLaw, type Law, type Scenario, type ScenarioInput } from "@/lib/simulation";
import { sizingFormulas, type SweepDefinition } from "@/lib/sweeps";
import { measureWords, parameterLabel, sweepKindLabels } from "@/components/sweeps/sweep-text";

export interface WordLine {
  label: string;
  text: string;
}

const plural = (n: number, one: string, many = `${one}s`) => `${formatNumber(n)} ${n === 1 ? one : many}`;
const list = (values: readonly number[]) => values.map((v) => formatNumber(v)).join(", ");

/** "Gamma: mean 1, coefficient of variation 0.5 (time units)". */
export function lawWords(law: Law): string {
  const spec = lawSpecs[law.law];
  if (law.law === "empirical") return `${spec.label}: ${plural(law.samples.length, "value")} with mean ${formatNumber(lawMean(law))} time units`;
  const params = lawForm(law).params.map((p) => {
    const value = (law as Record<string, unknown>)[p.key];
    const shown = Array.isArray(value) ? list(value as number[]) : formatNumber(value as number);
    return `${p.label.toLowerCase()} ${shown}${p.unit ? ` ${p.unit}` : ""}`;
  });
  return `${spec.label}: ${params.join(", ")}`;
}

function batchWords(size: BatchSizeLaw): string {
  const spec = batchSizeSpecs[size.law];
  const params = spec.params.map((p) => {
    const value = (size as Record<string, unknown>)[p.key];
    return `${p.label.toLowerCase()} ${Array.isArray(value) ? list(value as number[]) : formatNumber(value as number)}`;
  });
  return `${spec.label.toLowerCase()} (${params.join(", ")})`;
}

function arrivalWords(a: Scenario["arrivals"]): string {
  const label = arrivalProcesses[a.process].label;
  switch (a.process) {
    case "poisson":
      return `${label}: ${formatNumber(a.rate)} calls per time unit`;
    case "on-off":
      return `${label}: bursts at ${formatNumber(a.onRate)} calls per time unit lasting ${formatNumber(a.meanOn)} time units on average, silences of ${formatNumber(a.meanOff)} on average`;
    case "mmpp":
      return `${label}: ${plural(a.rates.length, "phase")} with call rates ${list(a.rates)} per time unit`;
    case "renewal":
      return `${label}: gaps between calls follow ${lawWords(a.interarrival)}`;
    case "batch":
      return `${label}: ${formatNumber(a.rate)} batches per time unit, sizes ${batchWords(a.batchSize)}; ${a.admission === "all-or-nothing" ? "a batch that does not fit whole is refused" : "as many calls of a batch as fit are carried"}`;
    case "overflow":
      return `${label}: what ${plural(a.primaries.length, "primary group")} refuse (${a.primaries.map((p) => `${formatErlangs(p.traffic)} on ${plural(p.servers, "circuit")}`).join("; ")})`;
    case "finite-source":
      return `${label}: ${plural(a.sources, "source")}, each calling ${formatNumber(a.idleRate)} times per time unit while idle`;
    case "time-varying": {
      const rates = a.profile.map((s) => s.rate);
      const cycle = a.profile.reduce((sum, s) => sum + s.duration, 0);
      return `${label}: ${plural(a.profile.length, "period")} repeating every ${formatNumber(cycle)} time units, call rates from ${formatNumber(Math.min(...rates))} to ${formatNumber(Math.max(...rates))} per time unit`;
    }
  }
}

function runWords(run: Scenario["run"]): string {
  const length = run.callsPerReplication !== undefined ? `${plural(run.callsPerReplication, "measured call")} each` : `${formatNumber(run.horizon)} time units each`;
  const warmup =
    run.warmup === "auto"
      ? "warm-up chosen from the data (MSER-5)"
      : run.warmupCalls !== undefined
        ? `warm-up of ${plural(run.warmupCalls, "call")} discarded`
        : run.warmupTime !== undefined
          ? `warm-up of ${formatNumber(run.warmupTime)} time units discarded`
          : "no warm-up discarded";
  const precision = run.precision
    ? `; more replications until the interval's half-width is within ${formatPercent(run.precision.relativeHalfWidth)} of the estimate (at most ${formatNumber(run.precision.maxCalls)} calls)`
    : "";
  return `${plural(run.replications, "replication")} of ${length}, ${warmup}, ${formatPercent(run.confidence)} confidence intervals, seed ${run.seed}${precision}`;
}

/**
 * A stored scenario with its defaults filled in. Stored documents were validated when submitted; should an older
 * one no longer pass today's schema, the report still shows it as stored rather than failing.
 */
export function storedScenario(input: ScenarioInput): Scenario {
  try {
    return parseScenario(input);
  } catch {
    return input as Scenario;
  }
}

/** The scenario's parts, each in one line of words. */
export function scenarioWords(s: Scenario): WordLine[] {
  const lines: WordLine[] = [
    {
      label: "Group under study",
      text: `${plural(s.servers, "circuit")}${s.waitingPositions > 0 ? ` and ${plural(s.waitingPositions, "waiting position")}` : "; no waiting positions, so a call that finds every circuit busy is refused"}`,
    },
    { label: "Arrivals", text: arrivalWords(s.arrivals) },
  ];
  try {
    lines.push({ label: "Mean offered traffic", text: `${formatErlangs(offeredTraffic(s))}${s.arrivals.process === "overflow" ? " offered to the primary groups" : ""}, before repeated attempts` });
  } catch {
    // A stored scenario always has a mean; if a law has none, the line is left out rather than guessed.
  }
  lines.push({ label: "Holding time", text: lawWords(s.holding) });
  if (s.patience) lines.push({ label: "Patience in the queue", text: lawWords(s.patience) });
  lines.push({
    label: "Repeated attempts",
    text: s.retrials
      ? `a refused call tries again with probability ${formatNumber(s.retrials.persistence)} after a pause (${lawWords(s.retrials.delay)})${s.retrials.maxAttempts ? `, at most ${plural(s.retrials.maxAttempts, "attempt")} in all` : ", with no limit on attempts"}`
      : "none: a refused call is lost",
  });
  lines.push({ label: "Run settings", text: runWords(s.run) });
  return lines;
}

/** What a sweep, sizing map or dimensioning search varied and judged against. */
export function sweepDefinitionWords(d: SweepDefinition): WordLine[] {
  const target = (t: number, measure: "callCongestion" | "timeCongestion", formula: keyof typeof sizingFormulas) =>
    `${formatPercent(t)} ${measureWords[measure]}; each group sized by ${sizingFormulas[formula].label}`;
  switch (d.kind) {
    case "sweep":
      return [
        { label: "Kind", text: `${sweepKindLabels.sweep}: one parameter over a list of values, all other inputs as in the base scenario` },
        { label: parameterLabel(d.parameter), text: list(d.values) },
      ];
    case "grid":
      return [
        { label: "Kind", text: `${sweepKindLabels.grid}: two parameters crossed; in each cell the formula sizes the group and the simulation says whether it holds` },
        { label: `Columns: ${parameterLabel(d.x.parameter)}`, text: list(d.x.values) },
        { label: `Rows: ${parameterLabel(d.y.parameter)}`, text: list(d.y.values) },
        { label: "Target grade of service", text: target(d.targetBlocking, d.measure, d.formula) },
      ];
    case "dimensioning":
      return [
        { label: "Kind", text: `${sweepKindLabels.dimensioning}: the smallest group whose upper confidence bound meets the target` },
        { label: "Target grade of service", text: target(d.targetBlocking, d.measure, d.formula) },
        { label: "Search limits", text: `at most ${plural(d.maxProbes, "group size")} simulated${d.confidence ? `; bound at ${formatPercent(d.confidence)} confidence` : "; bound at the scenario's run confidence"}` },
      ];
  }
}
