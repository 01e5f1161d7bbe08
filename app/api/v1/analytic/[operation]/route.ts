import { analyticOperations, type AnalyticOperationName } from "@/lib/teletraffic";
import { requireUser } from "@/lib/auth/guard";
import { apiRoute, jsonError, readJsonBody } from "@/lib/api/respond";
import { evaluateInPool } from "@/lib/analytic-pool";

type Context = { params: Promise<{ operation: string }> };

const maxBodyBytes = 200_000;

const isOperation = (name: string): name is AnalyticOperationName => Object.hasOwn(analyticOperations, name);

/**
 * POST a JSON body with the operation's inputs; 200 { operation, result }, 400 { error: { fields } }, 422 when the
 * case is too large for an interactive answer or has none, 429 when the caller already has evaluations running.
 */
export const POST = apiRoute<Context>(
  async (request, { params }) => {
    const user = await requireUser();
    const { operation } = await params;
    if (!isOperation(operation)) return jsonError(404, "not-found", `No analytic operation "${operation}". GET /api/v1/analytic lists them.`);
    const input = await readJsonBody(request, maxBodyBytes);
    return Response.json({ operation, result: await evaluateInPool(operation, input, { userId: user.id }) });
  },
  { maxBodyBytes },
);
