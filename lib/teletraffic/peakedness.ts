import { z } from "zod";
import { assertFiniteResult, parseInput, TeletrafficInputError } from "./errors";
import { batchMoments, batchSizeSchema, lawMean, lawSchema, type BatchSizeLaw } from "./laws";
import { solveDense } from "./dense";
import { stationaryOfGenerator } from "./qbd";
import { renewalPeakedness } from "./renewal";
import { equivalentRandomUnchecked, MAX_STREAM_MEAN, MAX_STREAM_VARIANCE } from "./overflow";
import { erlangBUnchecked } from "./erlang-b";
import { mmppPhasesSchema, mmppShapeIsSquare } from "./mmpp";

export { stationaryOfGenerator };

/** Solves x A = b: the transposed system A^T x^T = b^T. */
function solveRowSystem(a: number[][], b: number[]): number[] {
  return solveDense(a[0].map((_, i) => a.map((row) => row[i])), b);
}

/**
 * Mean and variance of the busy servers an MMPP would hold on an infinite group with exponential
 * holding (rate μ): with m_j = E[N; J = j] and f_j = E[N(N−1); J = j], the stationary moment
 * equations are m (μI − Q) = π Λ and f (2μI − Q) = 2 m Λ (Heffes 1980, "A class of data traffic
 * processes — covariance function characterization and related queuing results", BSTJ 59).
 */
export function mmppOfferedMoments(rates: number[], switching: number[][], meanHolding: number): { mean: number; variance: number } {
  const k = rates.length;
  const mu = 1 / meanHolding;
  const pi = stationaryOfGenerator(switching);
  const shifted = (c: number) =>
    Array.from({ length: k }, (_, i) =>
      Array.from({ length: k }, (_, j) => {
        if (i !== j) return -switching[i][j];
        let out = 0;
        for (let l = 0; l < k; l++) if (l !== i) out += switching[i][l];
        return c + out;
      }),
    );
  const m = solveRowSystem(shifted(mu), pi.map((p, i) => p * rates[i]));
  const f = solveRowSystem(shifted(2 * mu), m.map((x, i) => 2 * x * rates[i]));
  const mean = m.reduce((a, b) => a + b, 0);
  return { mean, variance: f.reduce((a, b) => a + b, 0) + mean - mean * mean };
}

/** Batch Poisson on an infinite group with exponential holding: Z = (1 + E[X²]/E[X]) / 2 (Campbell's theorem). */
export function batchPeakedness(law: BatchSizeLaw): number {
  const { m1, m2 } = batchMoments(law);
  return (1 + m2 / m1) / 2;
}

export const peakednessInputSchema = z
  .object({
    stream: z
      .discriminatedUnion("process", [
        z.object({ process: z.literal("renewal"), interarrival: lawSchema }),
        z.object({ process: z.literal("mmpp"), ...mmppPhasesSchema.shape }).superRefine((v, ctx) => void mmppShapeIsSquare(v, ctx)),
        z.object({ process: z.literal("batch"), rate: z.number().gt(0).max(1e9).describe("batch arrival rate"), batchSize: batchSizeSchema }),
      ])
      .describe("the offered stream: renewal {interarrival}, mmpp {rates, switching} or batch {rate, batchSize}"),
    meanHolding: z.number().gt(0).max(1e12).default(1).describe("mean exponential holding time, default 1"),
    servers: z.number().min(0).max(1e7).optional().describe("servers N the stream is offered to: adds equivalent random and Hayward blocking"),
  })
  .describe("mean, variance and peakedness of a stream on an infinite group with exponential holding; equivalent random and Hayward on N servers");
export type PeakednessInput = z.input<typeof peakednessInputSchema>;

export interface PeakednessResult {
  method: string;
  mean: number;
  variance: number;
  peakedness: number;
  servers?: number;
  equivalentRandomBlocking?: number;
  haywardBlocking?: number;
  /** why equivalent random is not given (peakedness below 1, or outside its domain) */
  equivalentRandomUnavailable?: string;
}

/** Mean and variance of the busy servers on an infinite group (the stream's traffic moments). */
export function streamMoments(stream: z.output<typeof peakednessInputSchema>["stream"], meanHolding: number): { mean: number; variance: number } {
  switch (stream.process) {
    case "renewal": {
      const mean = meanHolding / lawMean(stream.interarrival);
      return { mean, variance: mean * renewalPeakedness(stream.interarrival, meanHolding) };
    }
    case "mmpp":
      return mmppOfferedMoments(stream.rates, stream.switching, meanHolding);
    case "batch": {
      const mean = stream.rate * batchMoments(stream.batchSize).m1 * meanHolding;
      return { mean, variance: mean * batchPeakedness(stream.batchSize) };
    }
  }
}

/** Equivalent random (Z >= 1) and Hayward blocking of an (M, V) stream on N servers. */
export function peakedStreamBlocking(mean: number, variance: number, servers: number): { equivalentRandom?: number; hayward: number; unavailable?: string } {
  const z = variance / mean;
  const hayward = erlangBUnchecked(servers / z, mean / z);
  if (z < 1 - 1e-12) return { hayward, unavailable: `peakedness ${z.toPrecision(4)} is below 1: equivalent random models only peaked streams` };
  if (mean > MAX_STREAM_MEAN || variance > MAX_STREAM_VARIANCE) return { hayward, unavailable: `mean or variance beyond equivalent random's domain (M <= ${MAX_STREAM_MEAN}, V <= ${MAX_STREAM_VARIANCE})` };
  try {
    const er = equivalentRandomUnchecked(mean, Math.max(variance, mean));
    return { hayward, equivalentRandom: Math.min(1, (er.traffic * erlangBUnchecked(er.servers + servers, er.traffic)) / mean) };
  } catch (error) {
    if (error instanceof TeletrafficInputError) return { hayward, unavailable: error.message };
    throw error;
  }
}

export function streamPeakedness(input: PeakednessInput): PeakednessResult {
  const v = parseInput(peakednessInputSchema, input);
  const { mean, variance } = streamMoments(v.stream, v.meanHolding);
  const result: PeakednessResult = {
    method: `peakedness of a ${v.stream.process} stream for exponential holding (infinite-group moments)`,
    mean,
    variance,
    peakedness: variance / mean,
  };
  if (v.servers !== undefined) {
    const b = peakedStreamBlocking(mean, variance, v.servers);
    result.servers = v.servers;
    result.haywardBlocking = b.hayward;
    if (b.equivalentRandom !== undefined) result.equivalentRandomBlocking = b.equivalentRandom;
    if (b.unavailable) result.equivalentRandomUnavailable = b.unavailable;
  }
  return assertFiniteResult(result, "streamPeakedness");
}
