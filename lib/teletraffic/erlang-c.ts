import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { erlangBUnchecked, logErlangBUnchecked, MAX_SERVERS, trafficField } from "./erlang-b";
import { FULL_CONGESTION, WAITING_MEASURES } from "./measure-words";
import { logAddExp, NeumaierSum } from "./numeric";

const integerServers = z.number().int().min(1).max(MAX_SERVERS).describe(`integer number of servers N (1..${MAX_SERVERS})`);
const meanHoldingField = z.number().gt(0).max(1e12).default(1).describe("mean holding time h (> 0); waits are reported in the same unit; default 1");

export const erlangCInputSchema = z
  .object({
    servers: integerServers,
    traffic: trafficField,
    meanHolding: meanHoldingField,
    waitLimit: z.number().min(0).max(1e15).optional().describe("waiting-time limit t (same unit as meanHolding) for P(W <= t)"),
  })
  .describe("Erlang C delay system M/M/N: needs A < N for a stationary queue; waitingProbability = C(N, A), the share of calls that wait (every call is admitted)");
export type ErlangCInput = z.input<typeof erlangCInputSchema>;

export interface ErlangCResult {
  method: string;
  servers: number;
  traffic: number;
  /** Erlang C: share of calls that wait (no call is refused, so admitted calls are all calls) */
  waitingProbability: number;
  meanWait: number;
  meanWaitOfDelayed: number;
  meanQueueLength: number;
  occupancyPerServer: number;
  waitLimit?: number;
  probabilityWaitWithinLimit?: number;
}

/** Erlang C (Erlang 1917) through C = N B / (N - A (1 - B)), which inherits the stability of the B recursion. */
export function erlangC(input: ErlangCInput): ErlangCResult {
  const { servers: n, traffic: a, meanHolding: h, waitLimit } = parseInput(erlangCInputSchema, input);
  if (a >= n) throw inputError("traffic", `must be below the number of servers (${n}) for a stationary M/M/N queue`);
  const b = erlangBUnchecked(n, a);
  const c = a === 0 ? 0 : (n * b) / (n - a * (1 - b));
  const result: ErlangCResult = {
    method: "Erlang C (M/M/N, FIFO), via Erlang B",
    servers: n,
    traffic: a,
    waitingProbability: c,
    meanWait: (c * h) / (n - a),
    meanWaitOfDelayed: h / (n - a),
    meanQueueLength: (c * a) / (n - a),
    occupancyPerServer: a / n,
  };
  if (waitLimit !== undefined) {
    result.waitLimit = waitLimit;
    result.probabilityWaitWithinLimit = 1 - c * Math.exp((-(n - a) * waitLimit) / h);
  }
  return assertFiniteResult(result, "erlangC");
}

export const MAX_QUEUE_POSITIONS = 1_000_000;

export const finiteQueueInputSchema = z
  .object({
    servers: integerServers,
    traffic: trafficField,
    waitingPositions: z.number().int().min(0).max(MAX_QUEUE_POSITIONS).describe(`waiting positions Q (FIFO, 0..${MAX_QUEUE_POSITIONS}); Q = 0 is Erlang B`),
    meanHolding: meanHoldingField,
  })
  .describe(`M/M/N/N+Q: N servers, Q waiting positions, calls arriving to a full system are lost. ${WAITING_MEASURES}; ${FULL_CONGESTION}`);
export type FiniteQueueInput = z.input<typeof finiteQueueInputSchema>;

export interface FiniteQueueResult {
  method: string;
  servers: number;
  traffic: number;
  waitingPositions: number;
  /** share of time all N servers are busy (as the simulation and every other operation report it) */
  timeCongestion: number;
  /** share of time servers and waiting positions are all taken = share of calls refused (Poisson arrivals see time averages) */
  fullCongestion: number;
  /** share of admitted calls (not refused) that wait */
  waitingProbability: number;
  meanQueueLength: number;
  meanWait: number;
  meanWaitOfDelayed: number;
  carriedTraffic: number;
  lostTraffic: number;
}

/**
 * M/M/N/N+Q. The queue weights p_{N+k} = p_N ρ^k, ρ = A/N, are taken relative to the largest of
 * them (k = 0 for ρ <= 1, k = Q for ρ > 1), so they lie in (0, 1] and are summed directly
 * (Neumaier summation); the states below N enter as ln((1 − B)/B) with 1 − B = N / (N + A B(N−1, A))
 * (from the Erlang B recursion), which keeps its digits when B is near 1.
 * Why: summing k ln ρ in log space put the total near Q ln ρ (1.6e7 for N = 1, A = 1e7, Q = 1e6),
 * whose rounding left 6e-10 relative error in the time congestion; P(wait) and the carried
 * traffic, formed as differences from it, came out 0.6 % too large (carried 1.0058 on one server).
 */
export function finiteQueue(input: FiniteQueueInput): FiniteQueueResult {
  const { servers: n, traffic: a, waitingPositions: q, meanHolding: h } = parseInput(finiteQueueInputSchema, input);
  if (a === 0) {
    return { method: "M/M/N/N+Q", servers: n, traffic: a, waitingPositions: q, timeCongestion: 0, fullCongestion: 0, waitingProbability: 0, meanQueueLength: 0, meanWait: 0, meanWaitOfDelayed: 0, carriedTraffic: 0, lostTraffic: 0 };
  }
  // log1p: A − N is exact near ρ = 1, so ln ρ keeps its relative accuracy and Q ln ρ stays accurate
  const logRho = Math.log1p((a - n) / n);
  const ref = logRho > 0 ? q : 0; // index of the largest queue weight
  // Σ_{k<Q} w_k (waiting states), w_Q (full), Σ k w_k, with w_k = ρ^(k − ref) <= 1
  const wait = new NeumaierSum();
  const length = new NeumaierSum();
  for (let k = 0; k < q; k++) {
    const w = Math.exp((k - ref) * logRho);
    wait.add(w);
    length.add(k * w);
  }
  const top = Math.exp((q - ref) * logRho);
  length.add(q * top);
  // states 0..N−1 relative to p_{N+ref}: (1 − B)/B ρ^−ref
  const logB = logErlangBUnchecked(n, a);
  const logOneMinusB = Math.log(n) - Math.log(n + a * erlangBUnchecked(n - 1, a));
  const logBelow = logOneMinusB - logB - ref * logRho;
  const logQueue = Math.log(wait.value() + top);
  const logTotal = logAddExp(logBelow, logQueue);
  const scale = Math.exp(-logTotal);
  const pFull = q === 0 ? Math.exp(logB) : top * scale;
  const pServersBusy = q === 0 ? pFull : Math.exp(logQueue - logTotal);
  const logWait = Math.log(wait.value()); // −Infinity for Q = 0
  const logNotFull = logAddExp(logBelow, logWait);
  const pNotFull = Math.exp(logNotFull - logTotal); // 1 − pFull without cancellation
  // admitted calls that wait: P(N <= k < N + Q) / P(k < N + Q), PASTA
  const waitingProbability = Math.exp(logWait - logNotFull);
  const lq = length.value() * scale;
  const admitted = a * pNotFull;
  const meanWait = (lq / admitted) * h;
  return assertFiniteResult(
    {
      method: q === 0 ? "M/M/N/N+Q with Q = 0 (Erlang B)" : "M/M/N/N+Q (Erlang loss-delay), exact",
      servers: n,
      traffic: a,
      waitingPositions: q,
      timeCongestion: pServersBusy,
      fullCongestion: pFull,
      waitingProbability,
      meanQueueLength: lq,
      meanWait,
      meanWaitOfDelayed: waitingProbability > 0 ? meanWait / waitingProbability : 0,
      carriedTraffic: admitted,
      lostTraffic: a * pFull,
    },
    "finiteQueue",
  );
}

export const erlangCServersInputSchema = z
  .object({
    traffic: z.number().gt(0).max(MAX_SERVERS - 1).describe("offered traffic A in erlangs"),
    target: z.number().gt(0).describe("target: a probability in (0, 1) for waiting-probability and wait-beyond-limit, a time for mean-wait"),
    measure: z
      .enum(["waiting-probability", "mean-wait", "wait-beyond-limit"])
      .default("waiting-probability")
      .describe('"waiting-probability": C(N, A) <= target; "mean-wait": mean wait <= target; "wait-beyond-limit": P(W > waitLimit) <= target'),
    waitLimit: z.number().min(0).max(1e15).optional().describe("waiting-time limit t for wait-beyond-limit"),
    meanHolding: meanHoldingField,
  })
  .superRefine((v, ctx) => {
    if (v.measure !== "mean-wait" && !(v.target < 1)) ctx.addIssue({ code: "custom", path: ["target"], message: "must be below 1 for a probability" });
    if (v.measure === "wait-beyond-limit" && v.waitLimit === undefined) ctx.addIssue({ code: "custom", path: ["waitLimit"], message: "required with wait-beyond-limit" });
  })
  .describe("Erlang C sizing: smallest N meeting a target probability of waiting, mean wait, or probability of waiting longer than t; measureOneLess = the measure with one server fewer");
export type ErlangCServersInput = z.input<typeof erlangCServersInputSchema>;

/**
 * Smallest integer N > A meeting the target. C(N, A), the mean wait and P(W > t) all decrease in N
 * (Erlang 1917; monotonicity e.g. Iversen, handbook, delay chapter), so the Erlang B recursion is
 * walked up once and C = N B / (N − A (1 − B)) evaluated at each N > A: O(N) in all.
 */
export function erlangCServers(input: ErlangCServersInput): ErlangCResult & { target: number; measure: string; measureOneLess?: number } {
  const { traffic: a, target, measure, waitLimit, meanHolding: h } = parseInput(erlangCServersInputSchema, input);
  let b = 1;
  // With N − 1 <= A the queue is unstable: every call waits (C = 1, P(W > t) = 1), the mean wait is unbounded (left out)
  let previous: number | undefined = measure === "mean-wait" ? undefined : 1;
  for (let n = 1; n <= MAX_SERVERS; n++) {
    const ab = a * b;
    b = ab / (n + ab);
    if (n <= a) continue;
    const c = (n * b) / (n - a * (1 - b));
    const value = measure === "waiting-probability" ? c : measure === "mean-wait" ? (c * h) / (n - a) : c * Math.exp((-(n - a) * waitLimit!) / h);
    if (value <= target) {
      const result = erlangC({ servers: n, traffic: a, meanHolding: h, waitLimit });
      return {
        ...result,
        method: `smallest N by walking the Erlang B recursion${previous === undefined ? "; with one server fewer the queue is unstable (unbounded mean wait)" : ""}; ${result.method}`,
        target,
        measure,
        ...(previous !== undefined ? { measureOneLess: previous } : {}),
      };
    }
    previous = value;
  }
  throw inputError("target", `needs more than ${MAX_SERVERS} servers`);
}
