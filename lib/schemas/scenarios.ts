import { z } from "zod";
import { parseScenario, ScenarioError, type Scenario } from "../simulation";
import { pageLimitSchema, cursorSchema } from "./paging";

/**
 * A scenario document inside a request body: validated by the one scenario schema (lib/simulation/scenario.ts)
 * with its short messages, reported under `scenario.<path>` so a 400 names the exact field.
 */
export const scenarioBodySchema = z.unknown().transform((value, ctx): Scenario => {
  if (value === undefined) {
    ctx.addIssue({ code: "custom", message: "required" });
    return z.NEVER;
  }
  try {
    return parseScenario(value);
  } catch (error) {
    if (!(error instanceof ScenarioError)) throw error;
    // parseScenario's message starts with the path; the field key carries it, so keep only the reason.
    ctx.addIssue({ code: "custom", message: error.message.replace(/^[^:]*:\s*/, ""), path: error.path && error.path !== "scenario" ? [error.path] : [] });
    return z.NEVER;
  }
});

export const scenarioNameSchema = z.string().trim().min(1, "required").max(200, "must be at most 200 characters");
const descriptionSchema = z.string().trim().max(5000, "must be at most 5000 characters");
const noteSchema = z.string().trim().max(2000, "must be at most 2000 characters");

/** POST …/scenarios: a named scenario and its first revision. */
export const scenarioCreateSchema = z.strictObject({
  name: scenarioNameSchema,
  description: descriptionSchema.default(""),
  scenario: scenarioBodySchema,
  /** Why this revision exists (shown in the revision list). */
  note: noteSchema.default(""),
});
export type ScenarioCreateInput = z.input<typeof scenarioCreateSchema>;
export type ScenarioCreate = z.output<typeof scenarioCreateSchema>;

/**
 * PATCH …/scenarios/{id}: a new `scenario` makes a new immutable revision; `name` and `description` alone rename
 * without one (a revision is what gets simulated). `baseRevision`, when given, must still be the newest revision,
 * so two people editing at once cannot silently overwrite each other (409 otherwise).
 */
export const scenarioPatchSchema = z
  .strictObject({
    name: scenarioNameSchema.optional(),
    description: descriptionSchema.optional(),
    scenario: scenarioBodySchema.optional(),
    note: noteSchema.optional(),
    baseRevision: z.number().int("must be an integer").min(1, "must be >= 1").optional(),
  })
  .superRefine((value, ctx) => {
    if (value.name === undefined && value.description === undefined && value.scenario === undefined)
      ctx.addIssue({ code: "custom", path: ["scenario"], message: "give a new scenario, name or description" });
    if (value.note !== undefined && value.scenario === undefined)
      ctx.addIssue({ code: "custom", path: ["note"], message: "a note belongs to a new revision; send it with a scenario" });
  });
export type ScenarioPatchInput = z.input<typeof scenarioPatchSchema>;
export type ScenarioPatch = z.output<typeof scenarioPatchSchema>;

export const scenarioSorts = ["updated", "created", "name"] as const;

/** GET …/scenarios?q=&sort=&order=&limit=&cursor= */
export const scenarioListQuerySchema = z.strictObject({
  /** Words matched case-insensitively against name and description. */
  q: z.string().trim().max(200, "must be at most 200 characters").optional(),
  sort: z.enum(scenarioSorts).default("updated"),
  order: z.enum(["asc", "desc"]).optional(),
  limit: pageLimitSchema,
  cursor: cursorSchema.optional(),
});
export type ScenarioListQuery = z.output<typeof scenarioListQuerySchema>;

/** Path segment {revision}: a positive whole number. */
export const revisionNumberSchema = z.coerce.number().int("must be an integer").min(1, "must be >= 1").max(2_147_483_647, "is too large");
