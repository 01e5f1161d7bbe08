import { z } from "zod";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import { evaluateInPool } from "@/lib/analytic-pool";
import { parseScenario } from "@/lib/simulation";
import type { ReferencesResponse } from "@/lib/jobs/api-types";

type Context = { params: Promise<{ workspace: string }> };

/**
 * The exact chains behind some references (overflow networks, MMPP) take seconds for mid-sized groups, more than the
 * closed forms' budget; they run in a pool thread that is stopped when this runs out, so the server stays free.
 */
const referencesBudgetMs = 10_000;

const bodySchema = z.strictObject({ scenario: z.unknown() });

/**
 * The analytic references for a scenario as typed in the editor: POST { scenario } -> { offeredTraffic, references }.
 * 400 with every failing scenario field (form paths) when the scenario is not valid; 422 when the methods cannot
 * answer within the interactive time budget, 429 when the caller already has evaluations running.
 */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "analytic.evaluate");
  const { scenario: input } = bodySchema.parse(await readJsonBody(request));
  // Validated here (cheap) so a 400 names every failing field; the exact chains run off the event loop.
  const scenario = parseScenario(input);
  const body = (await evaluateInPool("scenario-references", scenario, { userId: access.user.id, budgetMs: referencesBudgetMs })) as unknown as ReferencesResponse;
  return Response.json(body);
});
