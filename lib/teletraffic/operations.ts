import { z } from "zod";
import { inputError, parseInput } from "./errors";
import {
  erlangBSummary,
  maxTrafficForBlocking,
  minServersForBlocking,
  serversField,
  targetField,
  trafficField,
} from "./erlang-b";
import { erlangC, erlangCInputSchema, erlangCServers, erlangCServersInputSchema, finiteQueue, finiteQueueInputSchema } from "./erlang-c";
import { engset, engsetIdleRateForOfferedTraffic, engsetIdleRateInputSchema, engsetInputSchema, engsetServers, engsetServersInputSchema } from "./engset";
import {
  equivalentRandom,
  equivalentRandomInputSchema,
  haywardBlocking,
  haywardInputSchema,
  overflowMoments,
  overflowMomentsInputSchema,
} from "./overflow";
import { extendedErlangB, extendedErlangBInputSchema } from "./retrials";
import { renewalLossInputSchema, renewalLossSystem } from "./renewal";
import { mmppLossInputSchema, mmppLossSystem } from "./mmpp";
import { batchLossInputSchema, batchLossSystem, INTERACTIVE_BATCH_WORK, MAX_BATCH_WORK } from "./batch";
import {
  engsetQueue,
  engsetQueueInputSchema,
  INTERACTIVE_MARKOV_STATES,
  MAX_MARKOV_STATES,
  patienceQueue,
  patienceQueueInputSchema,
  retrialLossInputSchema,
  retrialLossSystem,
  retrialServers,
  retrialServersInputSchema,
} from "./markov-systems";
import { peakednessInputSchema, streamPeakedness } from "./peakedness";
import { INTERACTIVE_TIME_VARYING_WORK, MAX_TIME_VARYING_WORK, timeVaryingInputSchema, timeVaryingLoss } from "./time-varying";
import {
  INTERACTIVE_PERIODIC_QUEUE_WORK,
  INTERACTIVE_PERIODIC_WORK,
  MAX_PERIODIC_WORK,
  periodicLossInputSchema,
  periodicLossSystem,
  periodicQueueInputSchema,
  periodicQueueSystem,
} from "./periodic-loss";
import { INTERACTIVE_PERIODIC_RETRIAL_WORK, MAX_PERIODIC_RETRIAL_WORK, periodicRetrialInputSchema, periodicRetrialSystem } from "./periodic-retrial";
import { INTERACTIVE_RENEWAL_WORK, MAX_RENEWAL_WORK } from "./renewal";
import { INTERACTIVE_MMPP_WORK, mmppQueueInputSchema, mmppQueueSystem } from "./mmpp";
import { overflowLossInputSchema, overflowLossSystem } from "./overflow-chain";
import { INTERACTIVE_RENEWAL_QUEUE_WORK, MAX_RENEWAL_QUEUE_WORK, renewalQueueInputSchema, renewalQueueSystem } from "./renewal-queue";
import { INTERACTIVE_RENEWAL_RETRIAL_WORK, renewalRetrialInputSchema, renewalRetrialSystem } from "./renewal-retrial";
import { batchRetrialInputSchema, batchRetrialSystem, INTERACTIVE_ORBIT_WORK, INTERACTIVE_OVERFLOW_RETRIAL_WORK, MAX_ORBIT_BAND, mmppRetrialInputSchema, mmppRetrialSystem, overflowRetrialInputSchema, overflowRetrialSystem } from "./orbit-chain";
import { kaufmanRoberts, kaufmanRobertsInputSchema } from "./multi-rate";

/** "erlang-b" takes exactly two of servers, traffic, target and dispatches on which are present. */
export const erlangBOperationInputSchema = z
  .strictObject({
    servers: serversField.optional(),
    traffic: trafficField.optional(),
    target: targetField.optional(),
  })
  .superRefine((v, ctx) => {
    const given = (["servers", "traffic", "target"] as const).filter((key) => v[key] !== undefined);
    if (given.length !== 2) {
      ctx.addIssue({
        code: "custom",
        path: [given.length > 2 ? "target" : "input"],
        message: "give exactly two of servers, traffic, target: {servers, traffic} → blocking; {servers, target} → largest traffic; {traffic, target} → smallest servers",
      });
    }
  })
  .describe("Erlang B: {servers, traffic} → blocking; {servers, target} → largest traffic; {traffic, target} → smallest integer servers (measureOneLess = blocking with one server fewer)");
export type ErlangBOperationInput = z.infer<typeof erlangBOperationInputSchema>;

function evaluateErlangB(raw: unknown): Record<string, unknown> {
  const v = parseInput(erlangBOperationInputSchema, raw);
  if (v.target === undefined) return { ...erlangBSummary({ servers: v.servers!, traffic: v.traffic! }) };
  if (v.traffic === undefined) return { ...maxTrafficForBlocking({ servers: v.servers!, target: v.target }) };
  if (v.traffic <= 0) throw inputError("traffic", "must be > 0 to size a group");
  // One name for the sizing operations' check figure (erlang-b, erlang-c-servers, engset-servers, retrial-servers)
  const { blockingOneLess, ...sized } = minServersForBlocking({ traffic: v.traffic, target: v.target });
  return { ...sized, measureOneLess: blockingOneLess };
}

export interface AnalyticOperation {
  summary: string;
  input: z.ZodType;
  evaluate(input: unknown): Record<string, unknown>;
  /** Size limits: what is answered interactively (about 100 ms) and what only as a background job. */
  limits?: string;
}

function operation<S extends z.ZodType>(summary: string, input: S, run: (value: z.input<S>) => object, limits?: string): AnalyticOperation {
  return { summary, input, evaluate: (value) => ({ ...run(parseInput(input, value) as z.input<S>) }), ...(limits ? { limits } : {}) };
}

const orbitLimits = `interactive up to states × lower band × upper band = ${INTERACTIVE_ORBIT_WORK} at the first orbit cap (32); at most ${MAX_ORBIT_BAND} band entries`;
const markovLimits = `interactive up to about ${INTERACTIVE_MARKOV_STATES} states (orbit levels × (N + Q + 1)); at most ${MAX_MARKOV_STATES}`;

/** Every analytic operation of the API and CLI, keyed by its kebab-case name. */
export const analyticOperations = {
  "erlang-b": {
    summary: "Erlang B loss system: blocking, or largest traffic / smallest group for a target blocking",
    input: erlangBOperationInputSchema,
    evaluate: evaluateErlangB,
  },
  "erlang-c": operation("Erlang C delay system: probability of waiting, mean wait, P(W <= t)", erlangCInputSchema, erlangC),
  "finite-queue": operation("M/M/N/N+Q: loss with a finite waiting room", finiteQueueInputSchema, finiteQueue),
  engset: operation("Engset finite-source loss: time, call and traffic congestion; intended and attempt-based offered traffic", engsetInputSchema, engset),
  "engset-idle-rate": operation("Engset inverse: idle-source call rate from the intended or the attempt-based offered traffic per source", engsetIdleRateInputSchema, engsetIdleRateForOfferedTraffic),
  "overflow-moments": operation("Riordan mean, variance and peakedness of overflow traffic", overflowMomentsInputSchema, overflowMoments),
  "equivalent-random": operation("Wilkinson equivalent random: A*, N* and blocking of an (M, V) stream", equivalentRandomInputSchema, equivalentRandom),
  hayward: operation("Hayward approximation for peaked or smooth traffic", haywardInputSchema, haywardBlocking),
  "extended-erlang-b": operation("extended Erlang B with repeated attempts (persistence): the fixed-point approximation", extendedErlangBInputSchema, extendedErlangB),
  "retrial-loss": operation(
    "exact retrial model: first-attempt blocking, loss, attempts per call, mean orbit (Poisson or finite sources, optional waiting room and patience)",
    retrialLossInputSchema,
    retrialLossSystem,
    markovLimits,
  ),
  "retrial-servers": operation("smallest N for a target loss (or first-attempt blocking) with retrials, exact model", retrialServersInputSchema, retrialServers, `each of the O(log N) evaluations as retrial-loss: ${markovLimits}`),
  "mmpp-retrial": operation(
    "retrials on Markov-modulated Poisson arrivals (optional waiting room and patience): exact first-attempt blocking, loss, attempts, orbit",
    mmppRetrialInputSchema,
    mmppRetrialSystem,
    orbitLimits,
  ),
  "batch-retrial": operation(
    "retrials on Poisson batches of any size law, partial or all-or-nothing (optional waiting room and patience): exact per call and per batch",
    batchRetrialInputSchema,
    batchRetrialSystem,
    orbitLimits,
  ),
  "overflow-retrial": operation(
    "retrials on overflow traffic: primary groups overflow to a final group whose refused calls retry there (optional waiting room and patience); exact first-attempt blocking, loss, attempts, orbit",
    overflowRetrialInputSchema,
    overflowRetrialSystem,
    `interactive up to states × lower band × upper band = ${INTERACTIVE_OVERFLOW_RETRIAL_WORK} at the first orbit cap (32; the band is mostly empty); at most ${MAX_ORBIT_BAND} band entries; levels are Π(nᵢ + 1) primary states × (N + Q + 1)`,
  ),
  "patience-queue": operation("M/M/N/N+Q with exponential patience: loss, waiting, mean wait, abandonment", patienceQueueInputSchema, patienceQueue, markovLimits),
  "engset-queue": operation("Engset with waiting positions (and optional patience): exact finite-source loss–delay system", engsetQueueInputSchema, engsetQueue, markovLimits),
  "erlang-c-servers": operation("Erlang C sizing: smallest N for a target probability of waiting, mean wait, or P(W > t)", erlangCServersInputSchema, erlangCServers, "O(N); N <= 10^7"),
  "engset-servers": operation("Engset sizing: smallest N for a target time or call congestion", engsetServersInputSchema, engsetServers, "O(N); S <= 10^7"),
  "renewal-loss": operation(
    "GI/M/N/N with renewal arrivals (Palm–Takács), any interarrival law: call and time congestion, peakedness",
    renewalLossInputSchema,
    renewalLossSystem,
    `interactive up to N × transform cost ${INTERACTIVE_RENEWAL_WORK} (closed forms cost 1, lognormal/Weibull/Pareto 400, empirical one per sample); at most ${MAX_RENEWAL_WORK}`,
  ),
  "renewal-queue": operation(
    "GI/M/N/N+Q with renewal arrivals, any interarrival law, optional exponential patience: exact loss, waiting, mean wait (embedded chain at arrivals)",
    renewalQueueInputSchema,
    renewalQueueSystem,
    `interactive up to (N + Q + 1)² × series terms = ${INTERACTIVE_RENEWAL_QUEUE_WORK} (terms estimated from the law's reach, or conservatively from the time to empty); at most ${MAX_RENEWAL_QUEUE_WORK}`,
  ),
  "renewal-retrial": operation(
    "retrials on renewal arrivals, any interarrival law with a short enough tail (optional waiting room and patience): exact first-attempt blocking, loss, attempts, orbit",
    renewalRetrialInputSchema,
    renewalRetrialSystem,
    `interactive up to 3 S² × series terms + S³ = ${INTERACTIVE_RENEWAL_RETRIAL_WORK} over the first two orbit caps (S states); N, Q <= 200, at most 3000 states; long-tailed laws (series beyond 20 000 terms) refused`,
  ),
  "mmpp-loss": operation("Markov-modulated Poisson arrivals (1–16 phases) on N servers: exact call and time congestion", mmppLossInputSchema, mmppLossSystem, `interactive up to (N + 1) × phases³ = ${INTERACTIVE_MMPP_WORK}; phases × (N + 1) <= 200 000`),
  "mmpp-queue": operation("Markov-modulated Poisson arrivals with waiting positions (and optional patience): exact loss, waiting and abandonment", mmppQueueInputSchema, mmppQueueSystem, `interactive up to (N + Q + 1) × phases³ = ${INTERACTIVE_MMPP_WORK}; phases × (N + Q + 1) <= 200 000`),
  "batch-loss": operation(
    "batch Poisson arrivals, any batch-size law, partial or all-or-nothing, optional waiting room: exact per call and per batch",
    batchLossInputSchema,
    batchLossSystem,
    `geometric O(N + Q); other laws interactive up to (N + Q + 1) × largest batch = ${INTERACTIVE_BATCH_WORK}, at most ${MAX_BATCH_WORK}`,
  ),
  peakedness: operation("mean, variance and peakedness of a renewal, MMPP or batch stream; equivalent random and Hayward on N servers", peakednessInputSchema, streamPeakedness),
  "time-varying-loss": operation(
    "time-varying load: pointwise stationary and modified offered load blocking per segment and over the cycle",
    timeVaryingInputSchema,
    timeVaryingLoss,
    `interactive up to about ${INTERACTIVE_TIME_VARYING_WORK} Erlang B steps (segments × quadrature nodes × the smaller of N + 1 and 2 × peak load + 932); at most ${MAX_TIME_VARYING_WORK}`,
  ),
  "periodic-loss": operation(
    "time-varying load with exponential holding: exact periodic blocking per segment and over the cycle (forward equations, stated error bound)",
    periodicLossInputSchema,
    periodicLossSystem,
    `interactive up to about ${INTERACTIVE_PERIODIC_WORK} state updates ((N + 1) × uniformisation terms over the cycles needed); at most ${MAX_PERIODIC_WORK}`,
  ),
  "periodic-queue": operation(
    "time-varying load with waiting positions (and optional exponential patience): exact periodic loss, waiting, mean wait and abandonment (forward equations, stated error bound)",
    periodicQueueInputSchema,
    periodicQueueSystem,
    `interactive up to about ${INTERACTIVE_PERIODIC_QUEUE_WORK} state updates ((N + Q + 51) × uniformisation terms over the cycles needed); at most ${MAX_PERIODIC_WORK}`,
  ),
  "periodic-retrial": operation(
    "time-varying load with retrials (optional waiting positions and exponential patience): exact periodic first-attempt blocking, loss, attempts and orbit per segment and over the cycle, bracketed by two bounding laws",
    periodicRetrialInputSchema,
    periodicRetrialSystem,
    `interactive up to about ${INTERACTIVE_PERIODIC_RETRIAL_WORK} state updates (2 × states × uniformisation terms × cycles); at most ${MAX_PERIODIC_RETRIAL_WORK}`,
  ),
  "overflow-loss": operation("exact overflow network beside equivalent random and Hayward", overflowLossInputSchema, overflowLossSystem),
  "multi-rate": operation("multi-rate loss link, Kaufman–Roberts recursion: per-class blocking", kaufmanRobertsInputSchema, kaufmanRoberts),
} satisfies Record<string, AnalyticOperation>;

export type AnalyticOperationName = keyof typeof analyticOperations;
export const analyticOperationNames = Object.keys(analyticOperations) as AnalyticOperationName[];
