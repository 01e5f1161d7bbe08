import { analyticOperations, type AnalyticOperationName } from "@/lib/teletraffic";
import { requireUser } from "@/lib/auth/guard";
import { apiRoute, jsonError, readJsonBody } from "@/lib/api/respond";

type Context = { params: Promise<{ operation: string }> };

const isOperation = (name: string): name is AnalyticOperationName => Object.hasOwn(analyticOperations, name);

/** POST a JSON body with the operation's inputs; 200 { operation, result } or 400 { error: { fields } }. */
export const POST = apiRoute<Context>(async (request, { params }) => {
  await requireUser();
  const { operation } = await params;
  if (!isOperation(operation)) return jsonError(404, "not-found", `No analytic operation "${operation}". GET /api/v1/analytic lists them.`);
  const input = await readJsonBody(request, 200_000);
  return Response.json({ operation, result: analyticOperations[operation].evaluate(input) });
});
