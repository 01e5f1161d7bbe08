import { z } from "zod";
import { assertFiniteResult, parseInput } from "./errors";
import { trafficField } from "./erlang-b";

export const MAX_BATCH_SERVERS = 1_000_000;

export const batchLossInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_BATCH_SERVERS).describe(`integer number of servers N (0..${MAX_BATCH_SERVERS})`),
    traffic: trafficField.describe("offered traffic in erlangs counted per call: batch rate × mean batch size × mean holding"),
    meanBatchSize: z.number().min(1).max(1e6).describe("mean m of the geometric batch size on 1, 2, ... (m = 1: single calls)"),
    admission: z.enum(["partial", "all-or-nothing"]).describe('"partial": admit as many calls as there are free servers; "all-or-nothing": lose the whole batch if it does not fit'),
  })
  .describe("batch Poisson arrivals with geometric batch sizes, exponential holding, blocked calls lost");
export type BatchLossInput = z.infer<typeof batchLossInputSchema>;

export interface BatchLossResult {
  method: string;
  servers: number;
  traffic: number;
  meanBatchSize: number;
  admission: "partial" | "all-or-nothing";
  /** fraction of time all N servers are busy */
  timeCongestion: number;
  /** fraction of individual calls lost */
  callCongestion: number;
  /** fraction of batches losing at least one call (all-or-nothing: losing the whole batch) */
  batchCongestion: number;
  carriedTraffic: number;
  lostTraffic: number;
}

/**
 * Exact one-dimensional chain. Cut equation between j and j+1 (holding time as unit, λ batches/unit):
 *   (j+1) p_{j+1} = λ Σ_{i<=j} p_i P(jump from i passes j).
 * With geometric sizes P(X > x) = q^x, q = 1 - 1/m, the sum obeys S_j = q S_{j-1} + p_j, and
 * "partial": P(pass) = q^{j-i}; "all-or-nothing": q^{j-i} - q^{N-i} = q^{j-i}(1 - q^{N-j}).
 * All terms are positive, so the recursion is stable; it is rescaled as it grows.
 */
export function batchPoissonLossSystem(input: BatchLossInput): BatchLossResult {
  const { servers: n, traffic, meanBatchSize: m, admission } = parseInput(batchLossInputSchema, input);
  const q = 1 - 1 / m;
  const batchLoad = traffic / m; // λ h
  const p = new Float64Array(n + 1);
  p[0] = 1;
  let s = 0;
  const qPow = (x: number) => (x === 0 ? 1 : Math.pow(q, x));
  for (let j = 0; j < n; j++) {
    s = q * s + p[j];
    const pass = admission === "partial" ? 1 : 1 - qPow(n - j);
    let next = (batchLoad * s * pass) / (j + 1);
    if (next > 1e250) {
      for (let i = 0; i <= j; i++) p[i] *= 1e-250;
      s *= 1e-250;
      next *= 1e-250;
    }
    p[j + 1] = next;
  }
  let total = 0;
  for (let j = 0; j <= n; j++) total += p[j];
  let batchCongestion = 0;
  let meanBusy = 0;
  let lostCalls = 0; // per batch, in calls
  for (let j = 0; j <= n; j++) {
    const pj = p[j] / total;
    const exceed = qPow(n - j); // P(X > N - j)
    batchCongestion += pj * exceed;
    meanBusy += j * pj;
    // partial: E[(X - (N-j))+] = q^{N-j} m (memoryless); all-or-nothing: E[X; X > N-j] = q^{N-j} (N - j + m)
    lostCalls += pj * exceed * (admission === "partial" ? m : n - j + m);
  }
  const callCongestion = Math.min(1, lostCalls / m);
  return assertFiniteResult(
    {
      method: `batch Poisson (geometric sizes) loss system, exact cut equations, ${admission} admission`,
      servers: n,
      traffic,
      meanBatchSize: m,
      admission,
      timeCongestion: p[n] / total,
      callCongestion,
      batchCongestion,
      // carried = mean number busy (Little, holding time as unit): traffic (1 − call congestion) cancels near 1
      carriedTraffic: meanBusy,
      lostTraffic: traffic * callCongestion,
    },
    "batchPoissonLossSystem",
  );
}
