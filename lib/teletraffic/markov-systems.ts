import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { FULL_CONGESTION, WAITING_MEASURES } from "./measure-words";
import { extendedErlangB } from "./retrials";
import {
  INTERACTIVE_MARKOV_STATES,
  MAX_MARKOV_STATES,
  markovSystemStates,
  solveMarkovSystem,
  TRUNCATION_BOUND,
  type MarkovSystemMeasures,
  type MarkovSystemModel,
} from "./retrial-chain";

export { INTERACTIVE_MARKOV_STATES, MAX_MARKOV_STATES, TRUNCATION_BOUND };

const meanField = (what: string) => z.number().gt(0).max(1e12).describe(what);
const serversField = z.number().int().min(1).max(100_000).describe("integer number of servers N (1..100 000)");
const waitingField = z.number().int().min(0).max(100_000).default(0).describe("waiting positions Q (FIFO), default 0");
const patienceField = meanField("mean exponential patience of a waiting call (it abandons after it); default: waits for ever").optional();
const holdingField = meanField("mean exponential holding time, default 1").default(1);

/** Fresh calls: Poisson traffic, or finite sources with an idle-source call rate. */
const freshCallFields = {
  traffic: z.number().gt(0).max(1e6).optional().describe("fresh (first-attempt) Poisson traffic in erlangs; or give sources and idleRate"),
  sources: z.number().int().min(1).max(1_000_000).optional().describe("number of finite sources S (with idleRate, instead of traffic)"),
  idleRate: z.number().gt(0).max(1e12).optional().describe("call rate of one idle source (with sources)"),
};

function checkFreshCalls(v: { traffic?: number; sources?: number; idleRate?: number }, ctx: z.RefinementCtx): void {
  const poisson = v.traffic !== undefined;
  const finite = v.sources !== undefined || v.idleRate !== undefined;
  if (poisson === finite) ctx.addIssue({ code: "custom", path: ["traffic"], message: "give either traffic (Poisson) or sources and idleRate (finite sources)" });
  else if (finite && (v.sources === undefined || v.idleRate === undefined))
    ctx.addIssue({ code: "custom", path: [v.sources === undefined ? "sources" : "idleRate"], message: "sources and idleRate go together" });
}

function checkPatience(v: { meanPatience?: number; waitingPositions: number }, ctx: z.RefinementCtx): void {
  if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
}

function checkSize(model: MarkovSystemModel, ctx: z.RefinementCtx): void {
  const states = markovSystemStates(model);
  if (states > MAX_MARKOV_STATES) ctx.addIssue({ code: "custom", path: ["servers"], message: `the chain has at least ${states} states, more than ${MAX_MARKOV_STATES}` });
}

export const retrialLossInputSchema = z
  .object({
    servers: serversField,
    ...freshCallFields,
    persistence: z.number().min(0).max(1).describe("probability that a refused call tries again (after every refusal), 0..1"),
    meanRetryDelay: meanField("mean exponential delay before a repeated attempt"),
    waitingPositions: waitingField,
    meanPatience: patienceField,
    meanHolding: holdingField,
  })
  .superRefine((v, ctx) => {
    checkFreshCalls(v, ctx);
    checkPatience(v, ctx);
    if (v.traffic !== undefined || (v.sources !== undefined && v.idleRate !== undefined)) checkSize(modelOf(v), ctx);
  })
  .describe(`exact retrial model: fresh calls, N servers (+ Q waiting positions), an orbit of refused calls retrying with persistence p after exponential delays. ${WAITING_MEASURES}; ${FULL_CONGESTION}`);
export type RetrialLossInput = z.input<typeof retrialLossInputSchema>;

type MarkovFields = {
  servers: number;
  traffic?: number;
  sources?: number;
  idleRate?: number;
  persistence?: number;
  meanRetryDelay?: number;
  waitingPositions: number;
  meanPatience?: number;
  meanHolding: number;
};

function modelOf(v: MarkovFields): MarkovSystemModel {
  return {
    servers: v.servers,
    waitingPositions: v.waitingPositions,
    meanHolding: v.meanHolding,
    patienceRate: v.meanPatience !== undefined ? 1 / v.meanPatience : 0,
    arrivals: v.traffic !== undefined ? { kind: "poisson", rate: v.traffic / v.meanHolding } : { kind: "finite-source", sources: v.sources!, idleRate: v.idleRate! },
    persistence: v.persistence ?? 0,
    retryRate: v.meanRetryDelay !== undefined ? 1 / v.meanRetryDelay : 0,
  };
}

export interface MarkovSystemResult extends MarkovSystemMeasures {
  method: string;
  servers: number;
  waitingPositions: number;
  /** fresh offered traffic in erlangs: the input as given for Poisson calls (finite sources: attempts of idle sources × mean holding) */
  offeredTraffic: number;
  /** true when the evaluation exceeds the interactive size (callers offer a background job) */
  large: boolean;
}

export interface RetrialLossResult extends MarkovSystemResult {
  persistence: number;
  /** Extended Erlang B at the same inputs (Poisson, no waiting room): the fixed-point approximation */
  extendedErlangB?: { firstAttemptBlocking: number; lossProbability: number; method: string };
}

function evaluate(v: MarkovFields, what: string): MarkovSystemResult {
  const model = modelOf(v);
  const r = solveMarkovSystem(model);
  const truncation = r.neglectedMass > 0 ? `; orbit truncated at ${r.orbitCap} calls, estimated neglected mass ${r.neglectedMass.toExponential(1)} (bound ${TRUNCATION_BOUND})` : "";
  const unfillable =
    v.sources !== undefined && v.sources < v.servers + v.waitingPositions
      ? `; the ${v.sources} sources cannot fill the ${v.servers + v.waitingPositions} places, so no call is refused (fullCongestion 0; allSourcesBusy: no source idle)`
      : "";
  return {
    method: `${what}, exact chain solved by rank-one level reduction (${r.states} states${truncation})${unfillable}`,
    servers: v.servers,
    waitingPositions: v.waitingPositions,
    large: r.states > INTERACTIVE_MARKOV_STATES,
    ...r,
    // Poisson: the traffic as given (Σ rate × π carries the rounding of the solve, 9.9 came back as 9.89999999999959)
    offeredTraffic: v.traffic !== undefined ? v.traffic : r.freshRate * v.meanHolding,
    freshRate: v.traffic !== undefined ? v.traffic / v.meanHolding : r.freshRate,
  };
}

/** Exact retrial model (Falin & Templeton 1997, "Retrial Queues", ch. 1–2, the M/M/c retrial queue with persistence). */
export function retrialLossSystem(input: RetrialLossInput): RetrialLossResult {
  const v = parseInput(retrialLossInputSchema, input);
  // With persistence 1 the orbit never gives up: a full group clears N/h by service and Q/patience by abandonment.
  const clearable = v.servers + (v.meanPatience !== undefined ? (v.waitingPositions * v.meanHolding) / v.meanPatience : 0);
  if (v.traffic !== undefined && v.persistence === 1 && v.traffic >= clearable)
    throw inputError(
      "traffic",
      v.meanPatience === undefined
        ? `with persistence 1 the orbit is stable only for traffic below the number of servers (${v.servers})`
        : `with persistence 1 the orbit is stable only for traffic below N + Q × holding/patience (${Number(clearable.toPrecision(6))} erlangs)`,
    );
  const result: RetrialLossResult = { ...evaluate(v, "retrial model"), persistence: v.persistence };
  if (v.traffic !== undefined && v.waitingPositions === 0 && v.persistence < 1) {
    const e = extendedErlangB({ servers: v.servers, traffic: v.traffic, persistence: v.persistence });
    result.extendedErlangB = { firstAttemptBlocking: e.blocking, lossProbability: e.probabilityFreshCallLost, method: e.method };
  }
  return assertFiniteResult(result, "retrialLossSystem");
}

export const patienceQueueInputSchema = z
  .object({
    servers: serversField,
    traffic: z.number().gt(0).max(1e6).describe("Poisson offered traffic in erlangs"),
    waitingPositions: z.number().int().min(1).max(100_000).describe("waiting positions Q (FIFO)"),
    meanPatience: patienceField,
    meanHolding: holdingField,
  })
  .describe(`M/M/N/N+Q with exponential patience (abandonment): birth–death chain. ${WAITING_MEASURES}; ${FULL_CONGESTION}`);
export type PatienceQueueInput = z.input<typeof patienceQueueInputSchema>;

/** M/M/N/N+Q+M, Palm's model of impatient callers (e.g. Gans, Koole & Mandelbaum 2003, M&SOM 5, the Erlang A model with a finite room). */
export function patienceQueue(input: PatienceQueueInput): MarkovSystemResult {
  const v = parseInput(patienceQueueInputSchema, input);
  return assertFiniteResult(evaluate(v, v.meanPatience !== undefined ? "M/M/N/N+Q with exponential patience" : "M/M/N/N+Q"), "patienceQueue");
}

export const engsetQueueInputSchema = z
  .object({
    sources: z.number().int().min(1).max(1_000_000).describe("number of sources S"),
    idleRate: z.number().gt(0).max(1e12).describe("call rate of one idle source"),
    servers: serversField,
    waitingPositions: z.number().int().min(1).max(100_000).describe("waiting positions Q (FIFO)"),
    meanPatience: patienceField,
    meanHolding: holdingField,
  })
  .describe(
    `Engset with waiting positions: S sources, N servers, Q waiting positions, calls finding all taken return to idle (with S < N + Q none ever is; allSourcesBusy = share of time no source is idle). ${WAITING_MEASURES}; ${FULL_CONGESTION}`,
  );
export type EngsetQueueInput = z.input<typeof engsetQueueInputSchema>;

/** Finite-source loss–delay system (Iversen, handbook, the machine-repair model with a limited queue). */
export function engsetQueue(input: EngsetQueueInput): MarkovSystemResult {
  const v = parseInput(engsetQueueInputSchema, input);
  return assertFiniteResult(evaluate(v, "Engset with waiting positions"), "engsetQueue");
}

export const retrialServersInputSchema = z
  .object({
    ...freshCallFields,
    persistence: z.number().min(0).max(1).describe("probability that a refused call tries again, 0..1"),
    meanRetryDelay: meanField("mean exponential delay before a repeated attempt"),
    meanHolding: holdingField,
    target: z.number().gt(0).lt(1).describe("target for the measure, strictly between 0 and 1"),
    measure: z.enum(["loss", "first-attempt"]).default("loss").describe('"loss": probability a fresh call is finally lost; "first-attempt": first-attempt blocking'),
  })
  .superRefine((v, ctx) => checkFreshCalls(v, ctx))
  .describe("smallest number of servers meeting a target loss with retrials (exact retrial model); measureOneLess = the measure with one server fewer");
export type RetrialServersInput = z.input<typeof retrialServersInputSchema>;

/**
 * Smallest N by bisection: both measures decrease as servers are added (more servers only
 * remove refusals), so the exact model is evaluated O(log N) times.
 */
export function retrialServers(input: RetrialServersInput): RetrialLossResult & { target: number; measure: string; measureOneLess: number } {
  const v = parseInput(retrialServersInputSchema, input);
  const value = (n: number) => {
    const fields = { ...v, servers: n, waitingPositions: 0 };
    const r = solveMarkovSystem(modelOf(fields));
    return { r, x: v.measure === "loss" ? r.lossProbability : r.firstAttemptBlocking };
  };
  const fresh = v.traffic ?? v.sources!;
  let lo = v.persistence === 1 && v.traffic !== undefined ? Math.floor(v.traffic) : 0; // fails (or is unstable)
  let hi = Math.max(1, Math.ceil(fresh) + 1);
  while (value(hi).x > v.target) {
    lo = hi;
    hi *= 2;
    if (hi > 100_000) throw inputError("target", "needs more than 100 000 servers");
  }
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (value(mid).x > v.target) lo = mid;
    else hi = mid;
  }
  const result = retrialLossSystem({ servers: hi, traffic: v.traffic, sources: v.sources, idleRate: v.idleRate, persistence: v.persistence, meanRetryDelay: v.meanRetryDelay, meanHolding: v.meanHolding });
  return {
    ...result,
    method: `smallest N by bisection on the exact retrial model; ${result.method}`,
    target: v.target,
    measure: v.measure,
    measureOneLess: hi > 1 && !(v.persistence === 1 && v.traffic !== undefined && hi - 1 <= v.traffic) ? value(hi - 1).x : 1,
  };
}
