import { getDatabase } from "@/db/client";
import { postgresObjectStore } from "@/db/queries/objects";
import { findUpload } from "@/db/queries/uploads";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, jsonError } from "@/lib/api/respond";

type Context = { params: Promise<{ workspace: string; uploadId: string }> };

/** The file exactly as uploaded, for any member. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const { workspace, uploadId } = await params;
  const access = await requireWorkspaceAccess(workspace, "workspace.read");
  const db = getDatabase();
  const upload = await findUpload(db, access.workspace.id, uploadId);
  const object = upload && (await postgresObjectStore(db).getObject(access.workspace.id, upload.objectKey));
  if (!upload || !object) return jsonError(404, "not-found", "No such upload in this workspace.");
  return new Response(object.bytes as BodyInit, {
    headers: {
      "content-type": `${object.contentType}; charset=utf-8`,
      "content-length": String(object.sizeBytes),
      "content-disposition": `attachment; filename="${upload.fileName}"; filename*=UTF-8''${encodeURIComponent(upload.fileName)}`,
      "x-content-sha256": object.sha256,
      "cache-control": "private, no-store",
    },
  });
});
