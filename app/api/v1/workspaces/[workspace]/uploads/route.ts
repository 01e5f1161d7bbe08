import { getDatabase } from "@/db/client";
import { listUploads } from "@/db/queries/uploads";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { queueClient } from "@/lib/jobs/submit";
import { readUploadBody, refusingBadFiles, storeUpload, UPLOAD_BODY_BYTES, UPLOAD_CONTENT_TYPES } from "@/lib/storage/uploads";

type Context = { params: Promise<{ workspace: string }> };

/** The workspace's uploads, newest first. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read");
  return Response.json({ items: await listUploads(getDatabase(), access.workspace.id) });
});

/**
 * Uploads a call-record or interval-count CSV with its column mapping (multipart `file` + `mapping`, or the raw
 * file with `?mapping=<json>`). 400 naming the line on any problem, nothing stored; 202 { id, status } once the
 * file is stored and its characterisation queued.
 */
export const POST = apiRoute<Context>(
  async (request, { params }) => {
    const access = await requireWorkspaceAccess((await params).workspace, "upload.create");
    return refusingBadFiles(async () => {
      const body = await readUploadBody(request);
      const upload = await storeUpload(getDatabase(), await queueClient(), { workspaceId: access.workspace.id, userId: access.user.id }, body);
      return Response.json(upload, { status: 202 });
    });
  },
  { maxBodyBytes: UPLOAD_BODY_BYTES, contentTypes: UPLOAD_CONTENT_TYPES },
);
