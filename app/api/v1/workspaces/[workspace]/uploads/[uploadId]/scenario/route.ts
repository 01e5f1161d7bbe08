import { getDatabase } from "@/db/client";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import { makeUploadScenario, refusingBadFiles } from "@/lib/storage/uploads";

type Context = { params: Promise<{ workspace: string; uploadId: string }> };

/**
 * Makes a scenario from a characterised upload: `{ source: "busy-hour" | "daily-profile", holding?, targetBlocking?,
 * name? }` -> 201 { scenarioId, name, made } (409 while it is still being characterised).
 */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const { workspace, uploadId } = await params;
  const access = await requireWorkspaceAccess(workspace, "scenario.create");
  const input = await readJsonBody(request, 10_000);
  return refusingBadFiles(async () => Response.json(await makeUploadScenario(getDatabase(), { workspaceId: access.workspace.id, userId: access.user.id }, uploadId, input), { status: 201 }));
});
