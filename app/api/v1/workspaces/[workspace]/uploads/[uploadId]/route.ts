import { getDatabase } from "@/db/client";
import { findUpload } from "@/db/queries/uploads";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, jsonError } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string; uploadId: string }> };

/** One upload: status, progress, mapping and (once ready) its characterisation. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, uploadId } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const upload = await findUpload(getDatabase(), access.workspace.id, uploadId);
  if (!upload) return jsonError(404, "not-found", "No such upload in this workspace.");
  const { objectKey: _key, ...detail } = upload;
  return Response.json(detail);
});
