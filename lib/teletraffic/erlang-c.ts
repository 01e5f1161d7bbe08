import { z } from "zod";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { erlangBUnchecked, logErlangBUnchecked, MAX_SERVERS, trafficField } from "./erlang-b";
import { logAddExp } from "./numeric";

const integerServers = z.number().int().min(1).max(MAX_SERVERS).describe(`integer number of servers N (1..${MAX_SERVERS})`);
const meanHoldingField = z.number().gt(0).max(1e12).default(1).describe("mean holding time h (> 0); waits are reported in the same unit; default 1");

export const erlangCInputSchema = z
  .object({
    servers: integerServers,
    traffic: trafficField,
    meanHolding: meanHoldingField,
    waitLimit: z.number().min(0).max(1e15).optional().describe("waiting-time limit t (same unit as meanHolding) for P(W <= t)"),
  })
  .describe("Erlang C delay system M/M/N: needs A < N for a stationary queue");
export type ErlangCInput = z.input<typeof erlangCInputSchema>;

export interface ErlangCResult {
  method: string;
  servers: number;
  traffic: number;
  probabilityOfWaiting: number;
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
    probabilityOfWaiting: c,
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
    queuePositions: z.number().int().min(0).max(MAX_QUEUE_POSITIONS).describe(`waiting positions Q (0..${MAX_QUEUE_POSITIONS}); Q = 0 is Erlang B`),
    meanHolding: meanHoldingField,
  })
  .describe("M/M/N/N+Q: N servers, Q waiting positions, calls arriving to a full system are lost");
export type FiniteQueueInput = z.input<typeof finiteQueueInputSchema>;

export interface FiniteQueueResult {
  method: string;
  servers: number;
  traffic: number;
  queuePositions: number;
  timeCongestion: number;
  probabilityOfWaiting: number;
  probabilityAllServersBusy: number;
  meanQueueLength: number;
  meanWait: number;
  meanWaitOfDelayed: number;
  carriedTraffic: number;
  lostTraffic: number;
}

/**
 * M/M/N/N+Q. Relative to p_N: Σ_{j<=N} p_j = p_N / B(N, A) and p_{N+k} = p_N ρ^k, ρ = A/N,
 * summed in log space so large Q with ρ > 1 does not overflow.
 */
export function finiteQueue(input: FiniteQueueInput): FiniteQueueResult {
  const { servers: n, traffic: a, queuePositions: q, meanHolding: h } = parseInput(finiteQueueInputSchema, input);
  if (a === 0) {
    return { method: "M/M/N/N+Q", servers: n, traffic: a, queuePositions: q, timeCongestion: 0, probabilityOfWaiting: 0, probabilityAllServersBusy: 0, meanQueueLength: 0, meanWait: 0, meanWaitOfDelayed: 0, carriedTraffic: 0, lostTraffic: 0 };
  }
  const logRho = Math.log(a / n);
  // log weights relative to p_N
  const logHead = -logErlangBUnchecked(n, a); // Σ_{j<=N} p_j / p_N
  let logQueue = -Infinity; // Σ_{k=1..Q} ρ^k
  let logQueueLength = -Infinity; // Σ k ρ^k
  for (let k = 1; k <= q; k++) {
    logQueue = logAddExp(logQueue, k * logRho);
    logQueueLength = logAddExp(logQueueLength, Math.log(k) + k * logRho);
  }
  const logTotal = logAddExp(logHead, logQueue);
  const pFull = Math.exp(q * logRho - logTotal);
  const pServersBusy = Math.exp(logAddExp(0, logQueue) - logTotal);
  const lq = Math.exp(logQueueLength - logTotal);
  const probabilityOfWaiting = Math.max(0, pServersBusy - pFull);
  const admitted = a * (1 - pFull);
  const meanWait = (lq / admitted) * h;
  return assertFiniteResult(
    {
      method: q === 0 ? "M/M/N/N+Q with Q = 0 (Erlang B)" : "M/M/N/N+Q (Erlang loss-delay), exact",
      servers: n,
      traffic: a,
      queuePositions: q,
      timeCongestion: pFull,
      probabilityOfWaiting,
      probabilityAllServersBusy: pServersBusy,
      meanQueueLength: lq,
      meanWait,
      meanWaitOfDelayed: probabilityOfWaiting > 0 ? (meanWait * (1 - pFull)) / probabilityOfWaiting : 0,
      carriedTraffic: admitted,
      lostTraffic: a * pFull,
    },
    "finiteQueue",
  );
}
