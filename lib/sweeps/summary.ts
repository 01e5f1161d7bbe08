// The stored summary of a finished sweep: a curve, a holds/breaks map, or the dimensioning answer.
import type { Reference, SimulationResult } from "../simulation/index";
import type { SweepDefinition } from "./definition";
import { sizingFormulas, verdictOf, type Verdict } from "./sizing";

/** A point run as the summary needs it. */
export interface PointRun {
  runId: string;
  point: number;
  values: Record<string, number>;
  status: "queued" | "running" | "succeeded" | "failed" | "cancelled";
  result: SimulationResult | null;
  /** Analytic references stored with the run (computed once, when it started). */
  references: Reference[] | null;
  error: string | null;
  partial: boolean;
}

export interface Estimate {
  estimate: number;
  ciLow: number;
  ciHigh: number;
}

export interface CurvePoint {
  point: number;
  value: number;
  runId: string;
  status: PointRun["status"];
  replications: number;
  callCongestion: Estimate | null;
  timeCongestion: Estimate | null;
  /** Each analytic method's call congestion at this point (null where it could not be evaluated). */
  analytic: Record<string, number | null>;
  partial: boolean;
  error: string | null;
}

export interface SweepCurve {
  kind: "sweep";
  parameter: string;
  confidence: number | null;
  /** Methods with a value at one point at least, in first-seen order (one analytic curve each). */
  methods: string[];
  points: CurvePoint[];
}

export interface GridCell {
  point: number;
  x: number;
  y: number;
  runId: string;
  status: PointRun["status"];
  /** The group the formula sizes for the target at this cell's mean offered traffic. */
  servers: number;
  estimate: Estimate | null;
  verdict: Verdict | null;
  /** target - estimate: positive when the simulated grade of service is better than the target. */
  margin: number | null;
  error: string | null;
}

export interface GridMap {
  kind: "grid";
  x: { parameter: string; values: number[] };
  y: { parameter: string; values: number[] };
  targetBlocking: number;
  measure: "callCongestion" | "timeCongestion";
  formula: string;
  cells: GridCell[];
  counts: Record<Verdict, number>;
}

export interface DimensioningProbe {
  point: number;
  servers: number;
  runId: string;
  status: PointRun["status"];
  estimate: Estimate | null;
  meets: boolean | null;
}

export interface DimensioningAnswer {
  kind: "dimensioning";
  targetBlocking: number;
  measure: "callCongestion" | "timeCongestion";
  confidence: number | null;
  formula: { method: string; servers: number };
  /** The smallest group whose upper confidence bound meets the target; null when the search did not finish. */
  simulated: { servers: number; estimate: Estimate } | null;
  /** simulated - formula servers (positive: the formula under-sizes this traffic). */
  difference: number | null;
  probes: DimensioningProbe[];
  /** Why the search stopped without an answer. */
  unresolved?: string;
}

export type SweepSummary = SweepCurve | GridMap | DimensioningAnswer;

function estimateOf(result: SimulationResult | null, measure: "callCongestion" | "timeCongestion"): Estimate | null {
  const i = result?.[measure];
  return i ? { estimate: i.estimate, ciLow: i.ciLow, ciHigh: i.ciHigh } : null;
}

export function curveOf(definition: Extract<SweepDefinition, { kind: "sweep" }>, runs: readonly PointRun[]): SweepCurve {
  const methods: string[] = [];
  const points = [...runs]
    .sort((a, b) => a.point - b.point)
    .map((r) => {
      const analytic: Record<string, number | null> = {};
      for (const ref of r.references ?? []) {
        if (!(ref.method in analytic) && ref.callCongestion !== undefined && !methods.includes(ref.method)) methods.push(ref.method);
        analytic[ref.method] = ref.callCongestion ?? null;
      }
      return {
        point: r.point,
        value: r.values[definition.parameter],
        runId: r.runId,
        status: r.status,
        replications: r.result?.replications ?? 0,
        callCongestion: estimateOf(r.result, "callCongestion"),
        timeCongestion: estimateOf(r.result, "timeCongestion"),
        analytic,
        partial: r.partial,
        error: r.error,
      };
    });
  return { kind: "sweep", parameter: definition.parameter, confidence: runs.find((r) => r.result)?.result?.confidence ?? null, methods, points };
}

export function gridOf(definition: Extract<SweepDefinition, { kind: "grid" }>, runs: readonly PointRun[]): GridMap {
  const counts: Record<Verdict, number> = { holds: 0, breaks: 0, inconclusive: 0 };
  const cells = [...runs]
    .sort((a, b) => a.point - b.point)
    .map((r) => {
      const estimate = r.status === "succeeded" ? estimateOf(r.result, definition.measure) : null;
      const verdict = estimate ? verdictOf(estimate, definition.targetBlocking) : null;
      if (verdict) counts[verdict]++;
      return {
        point: r.point,
        x: r.values[definition.x.parameter],
        y: r.values[definition.y.parameter],
        runId: r.runId,
        status: r.status,
        servers: r.values.servers,
        estimate,
        verdict,
        margin: estimate ? definition.targetBlocking - estimate.estimate : null,
        error: r.error,
      };
    });
  return {
    kind: "grid",
    x: definition.x,
    y: definition.y,
    targetBlocking: definition.targetBlocking,
    measure: definition.measure,
    formula: sizingFormulas[definition.formula].label,
    cells,
    counts,
  };
}

/** Does a finished probe meet the target on its upper confidence bound? */
export function probeMeets(run: PointRun, definition: Extract<SweepDefinition, { kind: "dimensioning" }>): boolean | undefined {
  if (run.status !== "succeeded") return undefined;
  const e = estimateOf(run.result, definition.measure);
  return e ? e.ciHigh <= definition.targetBlocking : undefined;
}

export function dimensioningOf(
  definition: Extract<SweepDefinition, { kind: "dimensioning" }>,
  formulaN: number,
  runs: readonly PointRun[],
  answer: { servers: number } | { unresolved: string },
): DimensioningAnswer {
  const probes = [...runs]
    .sort((a, b) => a.point - b.point)
    .map((r) => ({ point: r.point, servers: r.values.servers, runId: r.runId, status: r.status, estimate: estimateOf(r.result, definition.measure), meets: probeMeets(r, definition) ?? null }));
  const found = "servers" in answer ? runs.find((r) => r.values.servers === answer.servers) : undefined;
  const estimate = found ? estimateOf(found.result, definition.measure) : null;
  return {
    kind: "dimensioning",
    targetBlocking: definition.targetBlocking,
    measure: definition.measure,
    confidence: runs.find((r) => r.result)?.result?.confidence ?? null,
    formula: { method: sizingFormulas[definition.formula].label, servers: formulaN },
    simulated: found && estimate ? { servers: found.values.servers, estimate } : null,
    difference: found ? found.values.servers - formulaN : null,
    probes,
    ...("unresolved" in answer ? { unresolved: answer.unresolved } : {}),
  };
}
