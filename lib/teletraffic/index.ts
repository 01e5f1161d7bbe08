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
 *   finiteQueue({ servers, traffic, queuePositions, meanHolding? }): FiniteQueueResult
 *   engset({ sources, servers, idleRate, meanHolding? }): EngsetResult
 *   engsetIdleRateForOfferedTraffic({ sources, servers, offeredPerSource, meanHolding?, tolerance?, maxIterations? }): EngsetIdleRateResult
 *   overflowMoments({ traffic, servers }): OverflowMoments                 // .mean .variance .peakedness
 *   equivalentRandom({ mean, variance, servers? }): EquivalentRandomResult // .equivalentTraffic .equivalentServers (.blocking .lostTraffic with servers)
 *   haywardBlocking({ mean, variance, servers }): HaywardResult            // .blocking .lostTraffic
 *   extendedErlangB({ servers, traffic, recallFactor, tolerance?, maxIterations? }): ExtendedErlangBResult
 *   renewalLossSystem({ servers, interarrival: InterarrivalLaw, meanHolding? }): RenewalLossResult   // .callCongestion .timeCongestion
 *   mmppLossSystem({ servers, rates: number[], switching: number[][], meanHolding? }): MmppLossResult
 *   batchPoissonLossSystem({ servers, traffic, meanBatchSize, admission: "partial" | "all-or-nothing" }): BatchLossResult
 *   overflowLossSystem({ primaries: [{ traffic, servers }], servers }): OverflowLossResult
 *   kaufmanRoberts({ capacity, classes: [{ traffic, bandwidth }] }): KaufmanRobertsResult
 */
export * from "./errors";
export * from "./erlang-b";
export * from "./erlang-c";
export * from "./engset";
export * from "./overflow";
export * from "./retrials";
export * from "./renewal";
export * from "./mmpp";
export * from "./batch";
export * from "./overflow-chain";
export * from "./multi-rate";
export * from "./operations";
