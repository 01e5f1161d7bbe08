import { z } from "zod";
import { jobStatuses, type JobStatus } from "./job-status";
import { cursorSchema, pageLimitSchema } from "./paging";
import { scenarioBodySchema } from "./scenarios";

const idSchema = z.string().trim().min(1, "required").max(100, "is not an id");
export const runNameSchema = z.string().trim().max(200, "must be at most 200 characters");

/**
 * What a run or sweep simulates: a stored scenario (its newest revision, or the `revision` named) or an inline
 * `scenario` document. Exactly one of `scenarioId` and `scenario`.
 */
export const scenarioSourceShape = {
  scenarioId: idSchema.optional(),
  revision: z.number().int("must be an integer").min(1, "must be >= 1").optional(),
  scenario: scenarioBodySchema.optional(),
  name: runNameSchema.default(""),
};

export function checkScenarioSource(value: { scenarioId?: string; revision?: number; scenario?: unknown }, ctx: z.RefinementCtx) {
  if ((value.scenarioId === undefined) === (value.scenario === undefined))
    ctx.addIssue({ code: "custom", path: ["scenarioId"], message: "give exactly one of scenarioId or scenario" });
  if (value.revision !== undefined && value.scenarioId === undefined)
    ctx.addIssue({ code: "custom", path: ["revision"], message: "needs scenarioId" });
}

/** POST …/runs: `{ scenarioId, revision? }` or `{ scenario }`, plus an optional `name`. */
export const runSubmitSchema = z.strictObject(scenarioSourceShape).superRefine(checkScenarioSource);
export type RunSubmitInput = z.input<typeof runSubmitSchema>;
export type RunSubmit = z.output<typeof runSubmitSchema>;

export const jobStatusSchema = z.enum(jobStatuses);

/** `status=queued,running`: one or more statuses, comma-separated (errors name `status` itself). */
export const statusFilterSchema = z.string().transform((text, ctx): JobStatus[] => {
  const parts = text.split(",").map((s) => s.trim()).filter(Boolean);
  const unknown = parts.filter((s) => !(jobStatuses as readonly string[]).includes(s));
  if (parts.length === 0 || unknown.length > 0) {
    ctx.addIssue({ code: "custom", message: `${unknown.length ? `"${unknown[0]}" is not a status; ` : ""}give one or more of ${jobStatuses.join(", ")}, comma-separated` });
    return z.NEVER;
  }
  return parts as JobStatus[];
});

/** GET …/runs?status=&scenarioId=&sweepId=&limit=&cursor=: newest first. Without `sweepId`, a sweep's point runs are left out. */
export const runListQuerySchema = z.strictObject({
  status: statusFilterSchema.optional(),
  scenarioId: idSchema.optional(),
  sweepId: idSchema.optional(),
  limit: pageLimitSchema,
  cursor: cursorSchema.optional(),
});
export type RunListQuery = z.output<typeof runListQuerySchema>;
