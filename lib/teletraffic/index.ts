/**
 * Spillway analytic teletraffic library. Pure TypeScript; every public function validates its
 * input with the exported zod schema and throws TeletrafficInputError (kind "input", field) on
 * out-of-domain input. Signatures:
 *
 *   erlangB(servers: number, traffic: number): number
 *   logErlangB(servers: number, traffic: number): number
 *   erlangBStateDistribution(servers: number, traffic: number): number[]
 *   erlangBSummary({ servers, traffic }): ErlangBSummary
 *   maxTrafficForBlocking({ servers, target }): MaxTrafficResult            // .traffic
 *   minServersForBlocking({ traffic, target }): MinServersResult           // .servers (integer), .realServers
 *   realServersForBlocking({ traffic, target }): RealServersResult         // .realServers
 *   erlangC({ servers, traffic, meanHolding?, waitLimit? }): ErlangCResult
 *   finiteQueue({ servers, traffic, waitingPositions, meanHolding? }): FiniteQueueResult    // .timeCongestion (all servers busy) .fullCongestion .waitingProbability (admitted calls)
 *   engset({ sources, servers, idleRate, meanHolding? }): EngsetResult
 *   engsetIdleRateForOfferedTraffic({ sources, servers, intendedPerSource | attemptPerSource, meanHolding?, tolerance? }): EngsetIdleRateResult
 *   overflowMoments({ traffic, servers }): OverflowMoments                 // .mean .variance .peakedness
 *   equivalentRandom({ mean, variance, servers? }): EquivalentRandomResult // .equivalentTraffic .equivalentServers (.blocking .lostTraffic with servers)
 *   haywardBlocking({ mean, variance, servers }): HaywardResult            // .blocking .lostTraffic
 *   extendedErlangB({ servers, traffic, persistence, tolerance?, maxIterations? }): ExtendedErlangBResult
 *   renewalLossSystem({ servers, interarrival: InterarrivalLaw, meanHolding? }): RenewalLossResult   // .callCongestion .timeCongestion
 *   mmppLossSystem({ servers, rates: number[], switching: number[][], meanHolding? }): MmppLossResult
 *   batchPoissonLossSystem({ servers, traffic, meanBatchSize, admission: "partial" | "all-or-nothing" }): BatchLossResult
 *   batchLossSystem({ servers, waitingPositions?, traffic, meanBatchSize | batchSize, admission, meanHolding?, meanPatience? }): BatchLossResult
 *   retrialLossSystem({ servers, traffic | sources+idleRate, persistence, meanRetryDelay, waitingPositions?, meanPatience?, meanHolding? }): RetrialLossResult
 *   patienceQueue / engsetQueue / retrialServers / erlangCServers / engsetServers / mmppQueueSystem
 *   streamPeakedness({ stream, meanHolding?, servers? }), timeVaryingLoss({ servers, profile, meanHolding? })
 *   periodicLossSystem({ servers, profile, meanHolding?, tolerance? }): PeriodicLossResult   // exact M(t)/M/N/N
 *   renewalQueueSystem({ servers, waitingPositions?, interarrival, meanHolding?, meanPatience? }): RenewalQueueResult   // GI/M/N/N+Q
 *   renewalRetrialSystem({ servers, waitingPositions?, interarrival, persistence, meanRetryDelay, meanPatience?, meanHolding? }): RenewalRetrialResult
 *   mmppRetrialSystem({ servers, waitingPositions?, rates, switching, persistence, meanRetryDelay, meanPatience?, meanHolding? }): OrbitChainResult
 *   batchRetrialSystem({ servers, waitingPositions?, traffic, batchSize, admission, persistence, meanRetryDelay, meanPatience?, meanHolding? }): OrbitChainResult
 *   periodicQueueSystem({ servers, waitingPositions, profile, meanHolding?, meanPatience?, tolerance? }): PeriodicQueueResult   // exact M(t)/M/N/N+Q(+M)
 *   overflowLossSystem({ primaries: [{ traffic, servers }], servers }): OverflowLossResult
 *   kaufmanRoberts({ capacity, classes: [{ traffic, bandwidth }] }): KaufmanRobertsResult
 *   analyticOperations[name].evaluate(input): Record<string, unknown>
 *
 * Iterative methods that cannot meet their tolerance throw TeletrafficConvergenceError (kind
 * "convergence"); extendedErlangB reports `converged` instead.
 */
export { TeletrafficConvergenceError, TeletrafficInputError } from "./errors";
export {
  erlangB,
  erlangBInputSchema,
  erlangBStateDistribution,
  erlangBStateDistributionInputSchema,
  erlangBSummary,
  logErlangB,
  maxTrafficForBlocking,
  maxTrafficInputSchema,
  minServersForBlocking,
  minServersInputSchema,
  realServersForBlocking,
  MAX_DISTRIBUTION_SERVERS,
  MAX_SERVERS,
  MAX_TRAFFIC,
  type ErlangBInput,
  type ErlangBStateDistributionInput,
  type ErlangBSummary,
  type MaxTrafficInput,
  type MaxTrafficResult,
  type MinServersInput,
  type MinServersResult,
  type RealServersResult,
} from "./erlang-b";
export {
  erlangC,
  erlangCInputSchema,
  erlangCServers,
  erlangCServersInputSchema,
  finiteQueue,
  finiteQueueInputSchema,
  MAX_QUEUE_POSITIONS,
  type ErlangCInput,
  type ErlangCResult,
  type FiniteQueueInput,
  type FiniteQueueResult,
} from "./erlang-c";
export {
  engset,
  engsetIdleRateForOfferedTraffic,
  engsetIdleRateInputSchema,
  engsetInputSchema,
  engsetServers,
  engsetServersInputSchema,
  MAX_SOURCES,
  type EngsetIdleRateInput,
  type EngsetIdleRateResult,
  type EngsetInput,
  type EngsetResult,
} from "./engset";
export {
  equivalentRandom,
  equivalentRandomInputSchema,
  haywardBlocking,
  haywardInputSchema,
  overflowMoments,
  overflowMomentsInputSchema,
  MAX_EQUIVALENT_TRAFFIC,
  MAX_STREAM_MEAN,
  MAX_STREAM_VARIANCE,
  type EquivalentRandomInput,
  type EquivalentRandomResult,
  type HaywardInput,
  type HaywardResult,
  type OverflowMoments,
  type OverflowMomentsInput,
} from "./overflow";
export { extendedErlangB, extendedErlangBInputSchema, type ExtendedErlangBInput, type ExtendedErlangBResult } from "./retrials";
export {
  interarrivalLawSchema,
  renewalLossInputSchema,
  renewalLossSystem,
  renewalPeakedness,
  renewalWork,
  INTERACTIVE_RENEWAL_WORK,
  MAX_RENEWAL_SERVERS,
  type InterarrivalLaw,
  type RenewalLossInput,
  type RenewalLossResult,
} from "./renewal";
export { mmppQueueInputSchema, mmppQueueSystem, type MmppQueueInput, type MmppQueueResult } from "./mmpp";
export { mmppLossInputSchema, mmppLossSystem, MAX_MMPP_STATES, MAX_MMPP_PHASES, INTERACTIVE_MMPP_WORK, type MmppLossInput, type MmppLossResult } from "./mmpp";
export {
  batchLossInputSchema,
  batchLossSystem,
  batchPoissonLossSystem,
  batchWork,
  INTERACTIVE_BATCH_WORK,
  MAX_BATCH_SERVERS,
  type BatchLossInput,
  type BatchLossResult,
} from "./batch";
export {
  balancedHyperexponential,
  batchMean,
  batchMoments,
  batchSizeSchema,
  hyperexponentialBranches,
  lawMean,
  lawSchema,
  LAW_LIMITS,
  weibullParameters,
  weibullShapeForCv,
  type BatchSizeLaw,
  type Law,
} from "./laws";
export { transformOf, type TransformLogs } from "./transform";
export { lnGamma } from "./numeric";
export {
  engsetQueue,
  engsetQueueInputSchema,
  patienceQueue,
  patienceQueueInputSchema,
  retrialLossInputSchema,
  retrialLossSystem,
  retrialServers,
  retrialServersInputSchema,
  INTERACTIVE_MARKOV_STATES,
  MAX_MARKOV_STATES,
  TRUNCATION_BOUND,
  type MarkovSystemResult,
  type RetrialLossInput,
  type RetrialLossResult,
} from "./markov-systems";
export { markovSystemStates, solveMarkovSystem, type MarkovSystemModel, type MarkovSystemMeasures } from "./retrial-chain";
export {
  batchPeakedness,
  mmppOfferedMoments,
  peakedStreamBlocking,
  peakednessInputSchema,
  stationaryOfGenerator,
  streamPeakedness,
  type PeakednessInput,
  type PeakednessResult,
} from "./peakedness";
export {
  timeVaryingInputSchema,
  timeVaryingLoss,
  timeVaryingWork,
  INTERACTIVE_TIME_VARYING_WORK,
  type TimeVaryingInput,
  type TimeVaryingResult,
  type TimeVaryingSegment,
} from "./time-varying";
export {
  periodicLossInputSchema,
  periodicLossSystem,
  periodicLossWork,
  periodicQueueInputSchema,
  periodicQueueSystem,
  periodicQueueWork,
  INTERACTIVE_PERIODIC_WORK,
  INTERACTIVE_PERIODIC_QUEUE_WORK,
  MAX_PERIODIC_WORK,
  type PeriodicLossInput,
  type PeriodicLossResult,
  type PeriodicLossSegment,
  type PeriodicQueueInput,
  type PeriodicQueueResult,
  type PeriodicQueueSegment,
} from "./periodic-loss";
export {
  periodicRetrialInputSchema,
  periodicRetrialSystem,
  periodicRetrialWork,
  INTERACTIVE_PERIODIC_RETRIAL_WORK,
  MAX_PERIODIC_RETRIAL_WORK,
  type PeriodicRetrialInput,
  type PeriodicRetrialResult,
  type PeriodicRetrialSegment,
} from "./periodic-retrial";
export {
  renewalQueueInputSchema,
  renewalQueueSystem,
  renewalQueueWork,
  INTERACTIVE_RENEWAL_QUEUE_WORK,
  MAX_RENEWAL_QUEUE_WORK,
  type RenewalQueueInput,
  type RenewalQueueResult,
} from "./renewal-queue";
export {
  renewalRetrialInputSchema,
  renewalRetrialSystem,
  renewalRetrialWork,
  INTERACTIVE_RENEWAL_RETRIAL_WORK,
  type RenewalRetrialInput,
  type RenewalRetrialResult,
} from "./renewal-retrial";
export {
  batchRetrialInputSchema,
  batchRetrialSystem,
  batchRetrialWork,
  mmppRetrialInputSchema,
  mmppRetrialSystem,
  mmppRetrialWork,
  overflowRetrialInputSchema,
  overflowRetrialSystem,
  overflowRetrialWork,
  INTERACTIVE_ORBIT_WORK,
  INTERACTIVE_OVERFLOW_RETRIAL_WORK,
  MAX_ORBIT_BAND,
  type BatchRetrialInput,
  type MmppRetrialInput,
  type OverflowRetrialInput,
  type OrbitChainResult,
} from "./orbit-chain";
export {
  overflowLossInputSchema,
  overflowLossSystem,
  MAX_OVERFLOW_STATES,
  MAX_OVERFLOW_WORK,
  type OverflowLossInput,
  type OverflowLossResult,
} from "./overflow-chain";
export {
  kaufmanRoberts,
  kaufmanRobertsInputSchema,
  MAX_CAPACITY,
  MAX_CLASSES,
  type KaufmanRobertsClassResult,
  type KaufmanRobertsInput,
  type KaufmanRobertsResult,
} from "./multi-rate";
export {
  analyticOperationNames,
  analyticOperations,
  erlangBOperationInputSchema,
  type AnalyticOperation,
  type AnalyticOperationName,
  type ErlangBOperationInput,
} from "./operations";
