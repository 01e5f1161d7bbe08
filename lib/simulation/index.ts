// Spillway simulation engine, browser-safe entry: schema, plan, aggregate, results, references.
// Node-only parts (thread pool, runScenario) are in ./node.ts.
export { scenarioSchema, parseScenario, ScenarioError, formatPath, scenarioErrorMap, scenarioFieldErrors, issuePath, lawSchema, arrivalsSchema, batchSizeSchema, LIMITS, lawMean } from "./scenario";
export type { Scenario, ScenarioInput, Law, BatchSizeLaw, Arrivals } from "./scenario";
export { Replication, type ReplicationStats, type ReplicationOptions } from "./engine";
export { ReplicationJob, runReplication, SimulationCancelledError, SLICE_EVENTS } from "./replication";
export { aggregateReplications, mergeAggregates, ChunkFolder, aggregateCalls, type PartialAggregate, type ReplicationRecord } from "./aggregate";
export { planRun, chunkRange, chunkCount, decideNext, callCongestionPrecision, expectedCallsPerReplication, PRECISION_MIN_REPLICATIONS, type RunPlan, type PlanDecision } from "./plan";
export { simulationResultSchema, buildResult, type SimulationResult } from "./result";
export { warningSchema, warningsFor, warningRules, type Warning } from "./warnings";
export { referencesFor, referenceSchema, offeredTraffic, type Reference } from "./references";
export { ratioInterval, mser5, type Interval } from "./estimators";
export { Random, SUBSTREAM } from "./random";
export { LawSampler, BatchSizeSampler } from "./laws";
export { planRunLength, planRunLengthInSlices, erlangTimeCongestionVariance, type RunLengthPlan, type RunLengthOptions } from "./run-length";
export { callCongestionEstimate, controlledRatio } from "./variance-reduction";
export { relaxationTime, unseenMeanShare } from "./diagnostics";
