import { z } from "zod";
import { phasesAreIrreducible } from "../teletraffic/qbd";
import { batchSizeSchema, LAW_LIMITS, lawMean, lawSchema, type BatchSizeLaw, type Law } from "../teletraffic/laws";
import { arrivalEventRate, freshCallRate } from "./traffic";

// One vocabulary of laws with the analytic operations (lib/teletraffic/laws.ts).
export { batchSizeSchema, lawSchema, type BatchSizeLaw, type Law };
export { freshCallRate };
export { batchMean } from "../teletraffic/laws";
export { lawMean };
export { lnGamma } from "../teletraffic/numeric";

/**
 * The scenario file shared by UI, API, CLI and worker. Rates and means are in one time
 * unit of the user's choice; offered traffic in erlangs = arrival rate x mean holding time.
 *
 * Upper bounds keep one run within what a browser-started job can finish; they are
 * product limits (common practice, no source), not properties of the methods.
 */
export const LIMITS = {
  servers: 100_000,
  waitingPositions: 100_000,
  phases: 16,
  primaries: 32,
  profileSegments: 1_000,
  empiricalValues: LAW_LIMITS.empiricalSamples,
  replications: 10_000,
  callsPerReplication: 100_000_000,
  totalCalls: 2_000_000_000,
  maxAttempts: 1_000,
  batchSize: LAW_LIMITS.batchSize,
  sources: 1_000_000,
} as const;

const positive = (what = "must be > 0") => z.number().gt(0, what).finite();
const nonNegative = () => z.number().min(0, "must be >= 0").finite();
const positiveInt = (max: number) => z.number().int("must be an integer").min(1, "must be >= 1").max(max, `must be <= ${max}`);
const probability = () => z.number().min(0, "must be >= 0").max(1, "must be <= 1");

const rateMatrix = z.array(z.array(nonNegative()));

export const arrivalsSchema = z.discriminatedUnion("process", [
  z.strictObject({ process: z.literal("poisson"), rate: positive() }),
  z
    .strictObject({
      process: z.literal("mmpp"),
      rates: z.array(nonNegative()).min(1, "needs at least 1 phase").max(LIMITS.phases, `at most ${LIMITS.phases} phases`),
      switching: rateMatrix,
    })
    .superRefine((v, ctx) => {
      const k = v.rates.length;
      if (!v.rates.some((r) => r > 0)) ctx.addIssue({ code: "custom", path: ["rates"], message: "at least one phase needs a rate > 0" });
      if (v.switching.length !== k) return ctx.addIssue({ code: "custom", path: ["switching"], message: `must be a ${k}x${k} matrix (one row per rate)` });
      v.switching.forEach((row, i) => {
        if (row.length !== k) ctx.addIssue({ code: "custom", path: ["switching", i], message: `must have ${k} entries` });
      });
      if (k > 1 && !phasesCommunicate(v.switching))
        ctx.addIssue({ code: "custom", path: ["switching"], message: "every phase must be reachable from every other (irreducible chain)" });
    }),
  z.strictObject({ process: z.literal("on-off"), onRate: positive(), meanOn: positive(), meanOff: positive() }),
  z.strictObject({ process: z.literal("renewal"), interarrival: lawSchema }),
  z.strictObject({
    process: z.literal("batch"),
    rate: positive(),
    batchSize: batchSizeSchema,
    admission: z.enum(["partial", "all-or-nothing"]).default("partial"),
  }),
  z.strictObject({
    process: z.literal("overflow"),
    primaries: z
      .array(
        z.strictObject({
          traffic: positive(),
          servers: z.number().int("must be an integer").min(0, "must be >= 0").max(LIMITS.servers, `must be <= ${LIMITS.servers}`),
        }),
      )
      .min(1, "needs at least 1 primary group")
      .max(LIMITS.primaries, `at most ${LIMITS.primaries} primary groups`),
  }),
  z.strictObject({
    process: z.literal("finite-source"),
    sources: positiveInt(LIMITS.sources),
    idleRate: positive(),
  }),
  z
    .strictObject({
      process: z.literal("time-varying"),
      profile: z
        .array(z.strictObject({ duration: positive(), rate: nonNegative() }))
        .min(1, "needs at least 1 segment")
        .max(LIMITS.profileSegments, `at most ${LIMITS.profileSegments} segments`),
    })
    .superRefine((v, ctx) => {
      if (!v.profile.some((s) => s.rate > 0)) ctx.addIssue({ code: "custom", path: ["profile"], message: "at least one segment needs a rate > 0" });
    }),
]);
export type Arrivals = z.infer<typeof arrivalsSchema>;

const phasesCommunicate = (switching: number[][]) => phasesAreIrreducible(switching.length, (i, j) => switching[i][j]);

export const retrialsSchema = z.strictObject({
  persistence: probability(),
  delay: lawSchema,
  maxAttempts: positiveInt(LIMITS.maxAttempts).optional(),
});

export const runSchema = z
  .strictObject({
    // Why: zod's int() also refuses integers beyond 2^53 - 1, so 2^53 was told "must be an integer".
    seed: z
      .number()
      .int("must be an integer from 0 to 9007199254740991 (2^53 - 1)")
      .min(0, "must be an integer from 0 to 9007199254740991 (2^53 - 1)")
      .max(Number.MAX_SAFE_INTEGER, "must be an integer from 0 to 9007199254740991 (2^53 - 1)"),
    replications: z.number().int("must be an integer").min(2, "must be >= 2 (a confidence interval needs two)").max(LIMITS.replications, `must be <= ${LIMITS.replications}`),
    callsPerReplication: positiveInt(LIMITS.callsPerReplication).optional(),
    horizon: positive().optional(),
    warmupCalls: z.number().int("must be an integer").min(0, "must be >= 0").max(LIMITS.callsPerReplication, `must be <= ${LIMITS.callsPerReplication}`).optional(),
    warmupTime: nonNegative().optional(),
    warmup: z.literal("auto").optional(),
    confidence: z.number().gt(0.5, "must be > 0.5").lt(1, "must be < 1").default(0.95),
    precision: z
      .strictObject({
        relativeHalfWidth: z.number().gt(0, "must be > 0").lt(1, "must be < 1"),
        maxCalls: positiveInt(LIMITS.totalCalls),
      })
      .optional(),
    /** Replications per chunk of background work; part of the run's definition because the fold order follows it. Default: about 10^6 calls a chunk. */
    chunkReplications: positiveInt(LIMITS.replications).optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.callsPerReplication === undefined) === (v.horizon === undefined))
      ctx.addIssue({ code: "custom", path: ["callsPerReplication"], message: "give exactly one of callsPerReplication or horizon" });
    const warmups = [v.warmupCalls, v.warmupTime, v.warmup].filter((w) => w !== undefined).length;
    if (warmups > 1) ctx.addIssue({ code: "custom", path: ["warmupCalls"], message: "give at most one of warmupCalls, warmupTime, warmup" });
    if (v.callsPerReplication !== undefined && v.callsPerReplication * v.replications > LIMITS.totalCalls)
      ctx.addIssue({ code: "custom", path: ["callsPerReplication"], message: `replications x callsPerReplication must be <= ${LIMITS.totalCalls}` });
  });

const scenarioBase = z.strictObject({
    servers: z.number().int("must be an integer").min(1, "must be >= 1").max(LIMITS.servers, `must be <= ${LIMITS.servers}`),
    waitingPositions: z.number().int("must be an integer").min(0, "must be >= 0").max(LIMITS.waitingPositions, `must be <= ${LIMITS.waitingPositions}`).default(0),
    patience: lawSchema.optional(),
    arrivals: arrivalsSchema,
    holding: lawSchema,
    retrials: retrialsSchema.optional(),
    run: runSchema,
  });

export const scenarioSchema = scenarioBase.superRefine((v, ctx) => {
    if (v.patience && v.waitingPositions === 0)
      ctx.addIssue({ code: "custom", path: ["patience"], message: "needs waitingPositions > 0" });
    // Why: only `fixed` was checked, so e.g. uniform {min: 9} on 5 servers ran and reported
    // call congestion 1. Any law whose smallest possible batch exceeds the capacity is refused.
    if (v.arrivals.process === "batch" && v.arrivals.admission === "all-or-nothing") {
      const b = v.arrivals.batchSize;
      const capacity = v.servers + v.waitingPositions;
      const smallest =
        b.law === "fixed" ? b.value : b.law === "uniform" ? b.min : b.law === "empirical" ? Math.min(...b.values.filter((_, i) => b.probabilities[i] > 0)) : 1;
      const field = b.law === "fixed" ? "value" : b.law === "uniform" ? "min" : "values";
      if (smallest > capacity)
        ctx.addIssue({ code: "custom", path: ["arrivals", "batchSize", field], message: `a batch larger than servers + waitingPositions (${capacity}) is always refused` });
    }
    // zod runs this refinement even when a nested refinement (e.g. a non-square switching
    // matrix) already failed; the rates are then not computable, and that issue is reported.
    try {
      checkWorkload(v, ctx);
    } catch {
      // nothing to add
    }
  });

/** Cross-field rules on the amount of work a scenario asks for. */
function checkWorkload(v: z.output<typeof scenarioBase>, ctx: z.RefinementCtx): void {
    // Why: with persistence 1 and no attempt limit every refused call retries until served, so
    // the retrying population grows without bound when the mean offered traffic is at least
    // the number of servers; the event count then grows quadratically and a run never ends.
    // (Finite sources cannot overload: the sources themselves bound the retrying population.)
    const r = v.retrials;
    if (r && r.persistence === 1 && r.maxAttempts === undefined && v.arrivals.process !== "finite-source") {
      const traffic = freshCallRate(v.arrivals, lawMean(v.holding)) * lawMean(v.holding);
      if (traffic >= v.servers)
        ctx.addIssue({
          code: "custom",
          path: ["retrials", "maxAttempts"],
          message: `required when persistence is 1 and the offered traffic (${Number(traffic.toPrecision(6))} E) is at least servers (${v.servers}): the retrying calls would grow without bound`,
        });
    }
    // Why: LIMITS.totalCalls was only checked for callsPerReplication, so a horizon of 1e300 or a
    // warm-up of 1e8 calls x 10 000 replications was accepted and ran for ever. The warm-up and
    // the horizon are converted to fresh arrivals (primary-group arrivals included for overflow)
    // at the mean rate.
    const rate = arrivalEventRate(v.arrivals, lawMean(v.holding));
    const perReplication =
      (v.run.callsPerReplication ?? (v.run.horizon ?? 0) * rate) + (v.run.warmupCalls ?? 0) + (v.run.warmupTime ?? 0) * rate;
    if (perReplication * v.run.replications > LIMITS.totalCalls)
      ctx.addIssue({
        code: "custom",
        path: ["run", v.run.horizon !== undefined ? "horizon" : v.run.warmupTime !== undefined ? "warmupTime" : "warmupCalls"],
        message: `about ${Number((perReplication * v.run.replications).toPrecision(3))} calls in all (replications x (warm-up + measured)); must be <= ${LIMITS.totalCalls}`,
      });
}

export type Scenario = z.infer<typeof scenarioSchema>;
export type ScenarioInput = z.input<typeof scenarioSchema>;

/** Invalid scenario: the caller's fault (CLI exit 2, API 400). */
export class ScenarioError extends Error {
  readonly kind = "input" as const;
  /** The first failing field as a form path (`arrivals.switching.1.0`), like every other domain error's `field`. */
  readonly field: string;
  constructor(
    message: string,
    readonly path: string = "",
    /** Every failing field (form path) with its message, in the same wording as `message`. */
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
    this.name = "ScenarioError";
    this.field = Object.keys(fields)[0] ?? (path ? path.replace(/\[(\d+)\]/g, ".$1") : "scenario");
  }
}

/** `arrivals.switching[1][0]` style. */
export function formatPath(path: readonly PropertyKey[]): string {
  let out = "";
  for (const part of path) out += typeof part === "number" ? `[${part}]` : out ? `.${String(part)}` : String(part);
  return out || "scenario";
}

function typeName(value: unknown): string {
  if (value === null) return "null";
  if (Array.isArray(value)) return "array";
  return typeof value;
}

/** The scenario's one-line wording for zod issues; the editor's resolver uses it too, so form and API say the same. */
export const scenarioErrorMap: z.core.$ZodErrorMap = (issue) => {
  switch (issue.code) {
    case "invalid_type":
      return issue.input === undefined ? "required" : `expected ${issue.expected}, got ${typeName(issue.input)}`;
    case "too_small":
      return issue.origin === "array" ? `needs at least ${issue.minimum} entries` : `must be ${issue.inclusive ? ">=" : ">"} ${issue.minimum}`;
    case "too_big":
      return issue.origin === "array" ? `at most ${issue.maximum} entries` : `must be ${issue.inclusive ? "<=" : "<"} ${issue.maximum}`;
    case "unrecognized_keys":
      return `unknown field${issue.keys.length > 1 ? "s" : ""} ${issue.keys.map((k) => `"${k}"`).join(", ")}`;
    case "invalid_union":
      if (issue.discriminator) return `must be one of ${(((issue as { options?: unknown[] }).options) ?? []).map((o) => `"${String(o)}"`).join(", ")}`;
      return undefined;
    case "invalid_value":
      return `must be one of ${issue.values.map((v) => JSON.stringify(v)).join(", ")}`;
    default:
      return undefined;
  }
};

/** Where an issue belongs: a discriminated union reports at the object, so name the discriminator field itself. */
export function issuePath(issue: z.core.$ZodIssue): PropertyKey[] {
  const path = [...issue.path];
  if (issue.code === "invalid_union" && issue.discriminator && path[path.length - 1] !== issue.discriminator) path.push(issue.discriminator);
  return path;
}

/** Form path (`arrivals.switching.1.0`) -> first message, for every issue; the keys react-hook-form uses. */
export function scenarioFieldErrors(issues: readonly z.core.$ZodIssue[]): Record<string, string> {
  const fields: Record<string, string> = {};
  for (const issue of issues) {
    const path = issuePath(issue);
    fields[path.length ? path.map(String).join(".") : "scenario"] ??= issue.message;
  }
  return fields;
}

/** Validates and fills defaults; throws ScenarioError with a one-line message naming the field. */
export function parseScenario(json: unknown): Scenario {
  const result = scenarioSchema.safeParse(json, { error: scenarioErrorMap });
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const where = formatPath(issuePath(issue));
  const more = result.error.issues.length > 1 ? ` (and ${result.error.issues.length - 1} more)` : "";
  throw new ScenarioError(`${where}: ${issue.message}${more}`, where, scenarioFieldErrors(result.error.issues));
}

