// Spillway simulation engine: pure TypeScript, no framework imports.
export { scenarioSchema, parseScenario, ScenarioError, formatPath, lawSchema, arrivalsSchema, batchSizeSchema, LIMITS, lawMean } from "./scenario";
export type { Scenario, ScenarioInput, Law, BatchSizeLaw, Arrivals } from "./scenario";
export { Replication, type ReplicationStats, type ReplicationOptions } from "./engine";
export { runScenario, runReplication, ReplicationJob, SimulationCancelledError, type RunOptions } from "./run";
export { simulationResultSchema, buildResult, type SimulationResult } from "./result";
export { referencesFor, referenceSchema, offeredTraffic, type Reference } from "./references";
export { ratioInterval, mser5, type Interval } from "./estimators";
export { Random, SUBSTREAM } from "./random";
export { LawSampler, BatchSizeSampler } from "./laws";
