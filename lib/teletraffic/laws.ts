import { z } from "zod";
import { lnGamma } from "./numeric";

/**
 * One vocabulary of laws for the whole program: the scenario file (holding, interarrival, retry
 * delay, patience, batch size) and the analytic operations (renewal-loss, batch-loss, peakedness)
 * validate with these schemas, so a law accepted in one place is accepted in the other.
 */
export const LAW_LIMITS = {
  erlangPhases: 100_000,
  hyperexponentialBranches: 16,
  empiricalSamples: 1_000_000,
  batchSize: 10_000,
} as const;

const positive = (what = "must be > 0") => z.number().gt(0, what).finite();
const nonNegative = () => z.number().min(0, "must be >= 0").finite();
const positiveInt = (max: number) => z.number().int("must be an integer").min(1, "must be >= 1").max(max, `must be <= ${max}`);
const probability = () => z.number().min(0, "must be >= 0").max(1, "must be <= 1");

export function sumsToOne(values: number[], ctx: z.RefinementCtx, path: (string | number)[]): void {
  const total = values.reduce((a, b) => a + b, 0);
  if (Math.abs(total - 1) > 1e-9) ctx.addIssue({ code: "custom", path, message: `must sum to 1 (sum is ${total})` });
}

/** Continuous laws of a positive time: holding, interarrival, retry delay, patience. */
export const lawSchema = z.discriminatedUnion("law", [
  z.strictObject({ law: z.literal("exponential"), mean: positive() }),
  z.strictObject({ law: z.literal("deterministic"), value: positive() }),
  z.strictObject({ law: z.literal("erlang"), k: positiveInt(LAW_LIMITS.erlangPhases), mean: positive() }),
  z
    .strictObject({
      law: z.literal("hyperexponential"),
      mean: positive().optional(),
      scv: z.number().finite().min(1, "must be >= 1 (a hyperexponential law is at least as variable as the exponential)").optional(),
      probabilities: z
        .array(probability())
        .min(2, "needs at least 2 branches")
        .max(LAW_LIMITS.hyperexponentialBranches, `at most ${LAW_LIMITS.hyperexponentialBranches} branches`)
        .optional(),
      means: z
        .array(positive())
        .min(2, "needs at least 2 branches")
        .max(LAW_LIMITS.hyperexponentialBranches, `at most ${LAW_LIMITS.hyperexponentialBranches} branches`)
        .optional(),
    })
    .superRefine((v, ctx) => {
      const balanced = v.mean !== undefined || v.scv !== undefined;
      const branches = v.probabilities !== undefined || v.means !== undefined;
      if (balanced === branches) {
        ctx.addIssue({ code: "custom", path: [], message: "give either {mean, scv} or {probabilities, means}" });
        return;
      }
      if (balanced) {
        if (v.mean === undefined) ctx.addIssue({ code: "custom", path: ["mean"], message: "required with scv" });
        if (v.scv === undefined) ctx.addIssue({ code: "custom", path: ["scv"], message: "required with mean" });
        return;
      }
      if (!v.probabilities) return ctx.addIssue({ code: "custom", path: ["probabilities"], message: "required with means" });
      if (!v.means) return ctx.addIssue({ code: "custom", path: ["means"], message: "required with probabilities" });
      if (v.probabilities.length !== v.means.length)
        ctx.addIssue({ code: "custom", path: ["means"], message: `must have as many entries as probabilities (${v.probabilities.length})` });
      sumsToOne(v.probabilities, ctx, ["probabilities"]);
    }),
  z.strictObject({ law: z.literal("lognormal"), mean: positive(), cv: positive() }),
  z.strictObject({ law: z.literal("gamma"), mean: positive(), cv: positive() }),
  z
    .strictObject({
      law: z.literal("weibull"),
      mean: positive().optional(),
      cv: z.number().finite().gt(0.01, "must be > 0.01").lt(50, "must be < 50").optional(),
      shape: z.number().finite().gt(0.05, "must be > 0.05").lt(100, "must be < 100").optional(),
      scale: positive().optional(),
    })
    .superRefine((v, ctx) => {
      const byMoments = v.mean !== undefined || v.cv !== undefined;
      const byParameters = v.shape !== undefined || v.scale !== undefined;
      if (byMoments === byParameters) return ctx.addIssue({ code: "custom", path: [], message: "give either {mean, cv} or {shape, scale}" });
      const pairs: Array<[keyof typeof v, keyof typeof v]> = byMoments ? [["mean", "cv"], ["cv", "mean"]] : [["shape", "scale"], ["scale", "shape"]];
      for (const [field, other] of pairs) if (v[field] === undefined) ctx.addIssue({ code: "custom", path: [field], message: `required with ${other}` });
    }),
  z.strictObject({ law: z.literal("pareto"), mean: positive(), shape: z.number().finite().gt(1, "must be > 1 (the mean is infinite otherwise)") }),
  z
    .strictObject({ law: z.literal("uniform"), min: nonNegative(), max: positive() })
    .superRefine((v, ctx) => {
      if (v.max <= v.min) ctx.addIssue({ code: "custom", path: ["max"], message: "must be > min" });
    }),
  z.strictObject({
    law: z.literal("empirical"),
    samples: z
      .array(nonNegative())
      .min(1, "needs at least 1 sample")
      .max(LAW_LIMITS.empiricalSamples, `at most ${LAW_LIMITS.empiricalSamples} samples`)
      .refine((s) => s.some((x) => x > 0), "must contain a value > 0"),
  }),
]);
export type Law = z.infer<typeof lawSchema>;
export type LawName = Law["law"];

/** Discrete laws on {1, 2, ...} for batch sizes. */
export const batchSizeSchema = z.discriminatedUnion("law", [
  z.strictObject({ law: z.literal("geometric"), mean: z.number().finite().min(1, "must be >= 1").max(LAW_LIMITS.batchSize, `must be <= ${LAW_LIMITS.batchSize}`) }),
  z.strictObject({ law: z.literal("fixed"), value: positiveInt(LAW_LIMITS.batchSize) }),
  z
    .strictObject({ law: z.literal("uniform"), min: positiveInt(LAW_LIMITS.batchSize), max: positiveInt(LAW_LIMITS.batchSize) })
    .superRefine((v, ctx) => {
      if (v.max < v.min) ctx.addIssue({ code: "custom", path: ["max"], message: "must be >= min" });
    }),
  z
    .strictObject({
      law: z.literal("empirical"),
      values: z.array(positiveInt(LAW_LIMITS.batchSize)).min(1, "needs at least 1 value").max(LAW_LIMITS.batchSize, `at most ${LAW_LIMITS.batchSize} values`),
      probabilities: z.array(probability()).min(1, "needs at least 1 probability"),
    })
    .superRefine((v, ctx) => {
      if (v.values.length !== v.probabilities.length)
        ctx.addIssue({ code: "custom", path: ["probabilities"], message: `must have as many entries as values (${v.values.length})` });
      sumsToOne(v.probabilities, ctx, ["probabilities"]);
    }),
]);
export type BatchSizeLaw = z.infer<typeof batchSizeSchema>;

/** Balanced-means two-branch hyperexponential for a mean and squared coefficient of variation >= 1 (Whitt 1982). */
export function balancedHyperexponential(mean: number, scv: number): { probabilities: number[]; means: number[] } {
  const p = (1 + Math.sqrt((scv - 1) / (scv + 1))) / 2;
  return { probabilities: [p, 1 - p], means: [mean / (2 * p), mean / (2 * (1 - p))] };
}

/** Branches of a hyperexponential law in either form. */
export function hyperexponentialBranches(law: Extract<Law, { law: "hyperexponential" }>): { probabilities: number[]; means: number[] } {
  return law.probabilities && law.means ? { probabilities: law.probabilities, means: law.means } : balancedHyperexponential(law.mean!, law.scv!);
}

/** Weibull shape k with the given coefficient of variation: cv^2 = G(1+2/k)/G(1+1/k)^2 - 1, decreasing in k. */
export function weibullShapeForCv(cv: number): number {
  const cvOf = (k: number) => Math.sqrt(Math.exp(lnGamma(1 + 2 / k) - 2 * lnGamma(1 + 1 / k)) - 1);
  let lo = Math.log(0.02);
  let hi = Math.log(200);
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (cvOf(Math.exp(mid)) > cv) lo = mid;
    else hi = mid;
  }
  return Math.exp((lo + hi) / 2);
}

/** Weibull {shape, scale} from either form. */
export function weibullParameters(law: Extract<Law, { law: "weibull" }>): { shape: number; scale: number } {
  const shape = law.shape ?? weibullShapeForCv(law.cv!);
  const scale = law.scale ?? law.mean! / Math.exp(lnGamma(1 + 1 / shape));
  return { shape, scale };
}

export function lawMean(law: Law): number {
  switch (law.law) {
    case "exponential":
    case "erlang":
    case "lognormal":
    case "gamma":
    case "pareto":
      return law.mean;
    case "deterministic":
      return law.value;
    case "hyperexponential":
      return law.mean ?? law.probabilities!.reduce((s, p, i) => s + p * law.means![i], 0);
    case "weibull":
      return law.mean ?? law.scale! * Math.exp(lnGamma(1 + 1 / law.shape!));
    case "uniform":
      return (law.min + law.max) / 2;
    case "empirical":
      return law.samples.reduce((a, b) => a + b, 0) / law.samples.length;
  }
}

export function batchMean(law: BatchSizeLaw): number {
  switch (law.law) {
    case "geometric":
      return law.mean;
    case "fixed":
      return law.value;
    case "uniform":
      return (law.min + law.max) / 2;
    case "empirical":
      return law.values.reduce((s, v, i) => s + v * law.probabilities[i], 0);
  }
}

/** E[X] and E[X^2] of a batch-size law. */
export function batchMoments(law: BatchSizeLaw): { m1: number; m2: number } {
  switch (law.law) {
    case "geometric":
      // var = m (m - 1) for the geometric law on 1, 2, ... with mean m
      return { m1: law.mean, m2: law.mean * (law.mean - 1) + law.mean * law.mean };
    case "fixed":
      return { m1: law.value, m2: law.value * law.value };
    case "uniform": {
      let m1 = 0;
      let m2 = 0;
      for (let x = law.min; x <= law.max; x++) {
        m1 += x;
        m2 += x * x;
      }
      const count = law.max - law.min + 1;
      return { m1: m1 / count, m2: m2 / count };
    }
    case "empirical": {
      let m1 = 0;
      let m2 = 0;
      law.values.forEach((x, i) => {
        m1 += x * law.probabilities[i];
        m2 += x * x * law.probabilities[i];
      });
      return { m1, m2 };
    }
  }
}

/**
 * Tail P(X > x) of a batch-size law for x = 0..upTo (P(X > 0) = 1), and the largest batch size
 * (Infinity for the geometric law).
 */
export function batchTail(law: BatchSizeLaw, upTo: number): { tail: Float64Array; largest: number } {
  const tail = new Float64Array(upTo + 1);
  const pmf = new Map<number, number>();
  let largest = 0;
  switch (law.law) {
    case "geometric": {
      const q = 1 - 1 / law.mean;
      for (let x = 0; x <= upTo; x++) tail[x] = x === 0 ? 1 : Math.pow(q, x);
      return { tail, largest: law.mean === 1 ? 1 : Infinity };
    }
    case "fixed":
      pmf.set(law.value, 1);
      break;
    case "uniform":
      for (let x = law.min; x <= law.max; x++) pmf.set(x, 1 / (law.max - law.min + 1));
      break;
    case "empirical":
      law.values.forEach((x, i) => pmf.set(x, (pmf.get(x) ?? 0) + law.probabilities[i]));
      break;
  }
  for (const [x, p] of pmf) if (p > 0) largest = Math.max(largest, x);
  // tail summed from the top, so small tails keep their digits
  const mass = new Float64Array(largest + 2);
  for (const [x, p] of pmf) mass[x] += p;
  let acc = 0;
  const full = new Float64Array(largest + 1);
  for (let x = largest; x >= 0; x--) {
    full[x] = acc; // P(X > x)
    acc += mass[x];
  }
  for (let x = 0; x <= upTo; x++) tail[x] = x === 0 ? 1 : x <= largest ? full[x] / acc : 0;
  return { tail, largest };
}
