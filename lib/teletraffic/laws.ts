import { z } from "zod";

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

export {
  balancedHyperexponential,
  hyperexponentialBranches,
  weibullShapeForCv,
  weibullParameters,
  lawMean,
  batchMean,
  batchMoments,
  batchTail,
} from "./law-formulas";
