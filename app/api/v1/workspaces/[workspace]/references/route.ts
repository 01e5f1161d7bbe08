import { z } from "zod";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import { offeredTraffic, parseScenario, referencesFor } from "@/lib/simulation";
import type { ReferencesResponse } from "@/lib/jobs/api-types";

type Context = { params: Promise<{ workspace: string }> };

const bodySchema = z.strictObject({ scenario: z.unknown() });

/**
 * The analytic references for a scenario as typed in the editor: POST { scenario } -> { offeredTraffic, references }.
 * 400 with every failing scenario field (form paths) when the scenario is not valid.
 */
export const POST = apiRoute<Context>(async (request, { params }) => {
  await requireWorkspaceAccess((await params).workspace, "analytic.evaluate");
  const { scenario: input } = bodySchema.parse(await readJsonBody(request));
  const scenario = parseScenario(input);
  // TODO(lead): run in the analytic worker-thread pool once it evaluates scenario references (lib/analytic-pool).
  const body: ReferencesResponse = { offeredTraffic: offeredTraffic(scenario), references: referencesFor(scenario) };
  return Response.json(body);
});
