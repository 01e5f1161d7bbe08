import { z } from "zod";
import { analyticOperations } from "@/lib/teletraffic";
import { requireUser } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";

/** Lists the operations with the JSON Schema of each one's input. */
export const GET = apiRoute(async () => {
  await requireUser();
  return Response.json({
    operations: Object.entries(analyticOperations).map(([name, op]) => ({
      name,
      summary: op.summary,
      path: `/api/v1/analytic/${name}`,
      input: z.toJSONSchema(op.input, { unrepresentable: "any" }),
    })),
  });
});
