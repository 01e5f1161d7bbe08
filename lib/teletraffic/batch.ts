import { z } from "zod";
import { WAITING_MEASURES } from "./measure-words";
import { assertFiniteResult, inputError, parseInput } from "./errors";
import { trafficField } from "./erlang-b";
import { batchMoments, batchSizeSchema, batchTail, type BatchSizeLaw } from "./laws";
import { departureRate } from "./departures";

export const MAX_BATCH_SERVERS = 1_000_000;
/** (N + Q + 1) × largest batch above which the general recursion is not interactive (about 100 ms). */
export const INTERACTIVE_BATCH_WORK = 20_000_000;
/** Hard bound on that work (about 10 s). */
export const MAX_BATCH_WORK = 2_000_000_000;

export const batchLossInputSchema = z
  .object({
    servers: z.number().int().min(0).max(MAX_BATCH_SERVERS).describe(`integer number of servers N (0..${MAX_BATCH_SERVERS})`),
    waitingPositions: z.number().int().min(0).max(MAX_BATCH_SERVERS).default(0).describe("waiting positions Q (FIFO), default 0"),
    traffic: trafficField.describe("offered traffic in erlangs counted per call: batch rate × mean batch size × mean holding"),
    meanBatchSize: z.number().min(1).max(1e6).optional().describe("mean m of a geometric batch size on 1, 2, ... (shorthand for batchSize {law: geometric, mean})"),
    batchSize: batchSizeSchema.optional().describe("batch-size law: geometric {mean}, fixed {value}, uniform {min, max}, empirical {values, probabilities}"),
    admission: z.enum(["partial", "all-or-nothing"]).describe('"partial": admit as many calls as there is room for; "all-or-nothing": lose the whole batch if it does not fit'),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1"),
    meanPatience: z.number().gt(0).max(1e12).optional().describe("mean exponential patience of a waiting call (abandons after it); default: waits for ever"),
  })
  .superRefine((v, ctx) => {
    if ((v.meanBatchSize === undefined) === (v.batchSize === undefined))
      ctx.addIssue({ code: "custom", path: ["batchSize"], message: "give exactly one of meanBatchSize (geometric) or batchSize (any law)" });
    if (v.meanPatience !== undefined && v.waitingPositions === 0) ctx.addIssue({ code: "custom", path: ["meanPatience"], message: "needs waitingPositions > 0" });
    const law = v.batchSize;
    if (law) {
      const work = batchWork(v.servers, v.waitingPositions, law);
      if (work > MAX_BATCH_WORK) ctx.addIssue({ code: "custom", path: ["servers"], message: `(N + Q + 1) × largest batch = ${work} exceeds ${MAX_BATCH_WORK}` });
    }
  })
  .describe(`batch Poisson arrivals with any batch-size law, exponential holding, optional waiting positions and patience; calls that find no room are lost. ${WAITING_MEASURES}`);
export type BatchLossInput = z.input<typeof batchLossInputSchema>;

export interface BatchLossResult {
  method: string;
  servers: number;
  waitingPositions: number;
  traffic: number;
  meanBatchSize: number;
  admission: "partial" | "all-or-nothing";
  /** fraction of time all N servers are busy */
  timeCongestion: number;
  /** fraction of individual calls refused on arrival */
  callCongestion: number;
  /** fraction of batches losing at least one call (all-or-nothing: losing the whole batch) */
  batchCongestion: number;
  carriedTraffic: number;
  lostTraffic: number;
  /** calls refused or abandoned / calls offered */
  lossProbability: number;
  /** with waiting positions: share of admitted calls that wait, their mean wait, mean queue, abandonment */
  waitingProbability: number;
  meanWait: number;
  meanQueueLength: number;
  abandonmentProbability: number;
}

/** Work units of the general recursion (the geometric law uses an O(N + Q) recursion). */
export function batchWork(servers: number, waitingPositions: number, law: BatchSizeLaw): number {
  const capacity = servers + waitingPositions;
  if (law.law === "geometric") return capacity + 1;
  return (capacity + 1) * Math.min(capacity + 1, largestBatch(law));
}

/**
 * Exact one-dimensional chain of the number of calls in the system, k = 0..K (K = N + Q), with
 * departure rate min(k, N) μ + (k − N)⁺ α. Cut equation between j and j+1 (Iversen, handbook,
 * batch arrivals; the standard level-crossing argument):
 *   d(j+1) p_{j+1} = λ Σ_{i<=j} p_i P(a batch arriving at i lifts the system above j),
 * with P = P(X > j − i) for partial admission and P(j − i < X <= K − i) for all-or-nothing.
 * All terms are positive; the recursion is rescaled as it grows. For geometric sizes the sum obeys
 * S_j = q S_{j−1} + p_j (O(K)); other laws cost O(K × largest batch).
 * Per batch arriving at i, with c = K − i free places, f = (N − i)⁺ free servers, T(x) = P(X > x)
 * and U(c) = E[(X − c)⁺] = Σ_{x>=c} T(x): partial refuses U(c) calls and queues Σ_{f<=x<c} T(x);
 * all-or-nothing refuses c T(c) + U(c) and queues U(f) − U(c) − (c − f) T(c).
 */
export function batchLossSystem(input: BatchLossInput): BatchLossResult {
  const v = parseInput(batchLossInputSchema, input);
  const law: BatchSizeLaw = v.batchSize ?? { law: "geometric", mean: v.meanBatchSize! };
  const { servers: n, waitingPositions: q, admission, meanHolding: h } = v;
  const allOrNothing = admission === "all-or-nothing";
  const capacity = n + q;
  const { m1 } = batchMoments(law);
  const mu = 1 / h;
  const alpha = v.meanPatience !== undefined ? 1 / v.meanPatience : 0;
  const batchRate = v.traffic / (m1 * h);
  if (allOrNothing && law.law !== "geometric") {
    const smallest = law.law === "fixed" ? law.value : law.law === "uniform" ? law.min : Math.min(...law.values.filter((_, i) => law.probabilities[i] > 0));
    if (smallest > capacity) throw inputError("batchSize", `every batch is larger than servers + waitingPositions (${capacity}) and is always refused`);
  }
  const geometric = law.law === "geometric";
  const ratio = geometric ? 1 - 1 / law.mean : 0;
  const span = geometric ? capacity + 1 : Math.max(capacity + 1, largestBatch(law));
  const { tail, largest } = batchTail(law, span);
  const tailAt = (x: number) => (x <= span ? tail[x] : geometric ? Math.pow(ratio, x) : 0);
  // U(c) = Σ_{x>=c} T(x) for c = 0..K
  const upper = new Float64Array(capacity + 2);
  if (geometric) for (let c = 0; c <= capacity + 1; c++) upper[c] = law.mean * tailAt(c);
  else {
    let acc = 0;
    for (let x = span; x > capacity + 1; x--) acc += tail[x];
    for (let c = capacity + 1; c >= 0; c--) {
      acc += tail[c];
      upper[c] = acc;
    }
  }
  /** P(j − i < X <= K − i) without cancelling two nearly equal tails for the geometric law. */
  const between = (a: number, b: number) => (geometric ? tailAt(a) * -Math.expm1((b - a) * Math.log(ratio)) : Math.max(0, tailAt(a) - tailAt(b)));
  const death = (k: number) => departureRate(k, n, mu, alpha);

  const p = new Float64Array(capacity + 1);
  p[0] = 1;
  let s = 0; // geometric: Σ_{i<=j} p_i q^{j−i}
  for (let j = 0; j < capacity; j++) {
    let flow = 0;
    if (geometric) {
      s = ratio * s + p[j];
      flow = allOrNothing ? s * -Math.expm1((capacity - j) * Math.log(ratio)) : s;
      if (ratio === 0) flow = allOrNothing ? p[j] * (capacity - j >= 1 ? 1 : 0) : p[j];
    } else {
      const from = Math.max(0, j - largest + 1);
      for (let i = from; i <= j; i++) flow += p[i] * (allOrNothing ? between(j - i, capacity - i) : tail[j - i]);
    }
    let next = (batchRate * flow) / death(j + 1);
    if (next > 1e250) {
      for (let i = 0; i <= j; i++) p[i] *= 1e-250;
      s *= 1e-250;
      next *= 1e-250;
    }
    p[j + 1] = next;
  }
  let total = 0;
  for (let k = 0; k <= capacity; k++) total += p[k];
  let batchCongestion = 0;
  let refusedCalls = 0;
  let admittedCalls = 0;
  let queuedCalls = 0;
  let busy = 0;
  let queue = 0;
  let allBusy = 0;
  for (let i = 0; i <= capacity; i++) {
    const pi = p[i] / total;
    if (pi === 0) continue;
    const c = capacity - i;
    const f = Math.max(0, n - i);
    const refused = allOrNothing ? c * tailAt(c) + upper[c] : upper[c];
    batchCongestion += pi * tailAt(c);
    refusedCalls += pi * refused;
    admittedCalls += pi * (allOrNothing ? m1 - c * tailAt(c) - upper[c] : m1 - upper[c]);
    queuedCalls += pi * (allOrNothing ? Math.max(0, upper[f] - upper[c] - (c - f) * tailAt(c)) : Math.max(0, upper[f] - upper[c]));
    busy += Math.min(i, n) * pi;
    queue += Math.max(0, i - n) * pi;
    if (i >= n) allBusy += pi;
  }
  const callCongestion = Math.min(1, refusedCalls / m1);
  const admittedRate = batchRate * admittedCalls;
  const abandonRate = alpha * queue;
  const geometricLabel = geometric ? "geometric sizes, O(N + Q) recursion" : `${law.law} sizes`;
  return assertFiniteResult(
    {
      method: `batch Poisson (${geometricLabel}), exact cut equations, ${admission} admission${q > 0 ? `, ${q} waiting positions` : ""}`,
      servers: n,
      waitingPositions: q,
      traffic: v.traffic,
      meanBatchSize: m1,
      admission,
      timeCongestion: n === 0 ? 1 : allBusy,
      callCongestion,
      batchCongestion,
      // carried = mean number busy (Little): traffic (1 − call congestion) cancels near 1
      carriedTraffic: busy,
      lostTraffic: v.traffic * callCongestion,
      lossProbability: Math.min(1, (refusedCalls * batchRate + abandonRate) / (m1 * batchRate)),
      waitingProbability: admittedCalls > 0 ? queuedCalls / admittedCalls : 0,
      meanWait: admittedRate > 0 ? queue / admittedRate : 0,
      meanQueueLength: queue,
      abandonmentProbability: admittedRate > 0 ? abandonRate / admittedRate : 0,
    },
    "batchLossSystem",
  );
}

function largestBatch(law: Exclude<BatchSizeLaw, { law: "geometric" }>): number {
  return law.law === "fixed" ? law.value : law.law === "uniform" ? law.max : Math.max(...law.values);
}

/** Geometric batches with N servers and no waiting room (the original operation's shape). */
export function batchPoissonLossSystem(input: { servers: number; traffic: number; meanBatchSize: number; admission: "partial" | "all-or-nothing" }): BatchLossResult {
  return batchLossSystem(input);
}
