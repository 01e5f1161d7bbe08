import { z } from "zod";
import { sweepDefinitionSchema, type SweepDefinition } from "../sweeps";
import type { Scenario } from "../simulation";
import { cursorSchema, pageLimitSchema } from "./paging";
import { checkScenarioSource, scenarioSourceShape, statusFilterSchema } from "./runs";

const sourceKeys = Object.keys(scenarioSourceShape) as (keyof typeof scenarioSourceShape)[];

export interface SweepSubmit {
  scenarioId?: string;
  revision?: number;
  scenario?: Scenario;
  name: string;
  definition: SweepDefinition;
}

/**
 * POST …/sweeps: where the base scenario comes from (`scenarioId` [+ `revision`] or `scenario`, as for runs) and,
 * beside it, the sweep definition of lib/sweeps: `{ parameter, values }` for one parameter,
 * `{ kind: "grid", x, y, targetBlocking, … }`, or `{ kind: "dimensioning", targetBlocking, … }`. Errors keep the
 * field paths of the body as sent.
 */
export const sweepSubmitSchema = z
  .record(z.string(), z.unknown(), { error: "must be a JSON object" })
  .transform((body, ctx): SweepSubmit => {
    const source: Record<string, unknown> = {};
    const definition: Record<string, unknown> = {};
    for (const [key, value] of Object.entries(body)) ((sourceKeys as string[]).includes(key) ? source : definition)[key] = value;
    const parsedSource = z.strictObject(scenarioSourceShape).superRefine(checkScenarioSource).safeParse(source);
    const parsedDefinition = sweepDefinitionSchema.safeParse(definition);
    for (const issue of [...(parsedSource.error?.issues ?? []), ...(parsedDefinition.error?.issues ?? [])]) {
      // A discriminated union reports at the object; name the discriminator itself (as parseScenario does).
      const path = issue.path as (string | number)[];
      const discriminator = issue.code === "invalid_union" && issue.discriminator && path[path.length - 1] !== issue.discriminator ? [issue.discriminator] : [];
      ctx.addIssue({ code: "custom", message: issue.message, path: [...path, ...discriminator] });
    }
    if (!parsedSource.success || !parsedDefinition.success) return z.NEVER;
    return { ...parsedSource.data, definition: parsedDefinition.data };
  });
export type SweepSubmitInput = Record<string, unknown>;

/** GET …/sweeps?status=&kind=&scenarioId=&limit=&cursor=: newest first. */
export const sweepListQuerySchema = z.strictObject({
  status: statusFilterSchema.optional(),
  kind: z.enum(["sweep", "grid", "dimensioning"]).optional(),
  scenarioId: z.string().trim().min(1).max(100).optional(),
  limit: pageLimitSchema,
  cursor: cursorSchema.optional(),
});
export type SweepListQuery = z.output<typeof sweepListQuerySchema>;
