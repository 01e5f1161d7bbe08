import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute } from "@/lib/api/respond";
import { previewUpload, readUploadBody, refusingBadFiles, UPLOAD_BODY_BYTES, UPLOAD_CONTENT_TYPES } from "@/lib/storage/uploads";

type Context = { params: Promise<{ workspace: string }> };

/** The header, the first rows with their line numbers and a guessed mapping, for the mapping step; stores nothing. */
export const POST = apiRoute<Context>(
  async (request, { params }) => {
    await requireWorkspaceAccess((await params).workspace, "upload.create");
    return refusingBadFiles(async () => Response.json(await previewUpload(await readUploadBody(request))));
  },
  { maxBodyBytes: UPLOAD_BODY_BYTES, contentTypes: UPLOAD_CONTENT_TYPES },
);
