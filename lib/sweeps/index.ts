// Sweeps, grids and simulation-based dimensioning: pure definitions, parameters, sizing and summaries.
export { sweepParameters, sweepParameterNames, checkParameterValue, SweepParameterError, scaleLaw, lawScv, trafficAtGroup, type SweepParameter, type SweepParameterName } from "./parameters";
export {
  sweepDefinitionSchema,
  parseSweepDefinition,
  SweepDefinitionError,
  expandSweep,
  probePoint,
  plannedPoints,
  scenarioAt,
  MAX_AXIS_VALUES,
  MAX_PROBES,
  type SweepDefinition,
  type SweepDefinitionInput,
  type SweepKind,
  type SweepPoint,
} from "./definition";
export { sizingFormulas, sizingFormulaNames, formulaServers, verdictOf, nextProbe, type SizingFormula, type Verdict, type Probe, type ProbeDecision } from "./sizing";
export {
  curveOf,
  gridOf,
  dimensioningOf,
  probeMeets,
  type PointRun,
  type SweepSummary,
  type SweepCurve,
  type GridMap,
  type GridCell,
  type DimensioningAnswer,
  type DimensioningProbe,
  type CurvePoint,
  type Estimate,
} from "./summary";
