import { getDatabase } from "@/db/client";
import { createApiToken, listApiTokens } from "@/db/queries/tokens";
import { requireWorkspaceAccess } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import { apiTokenCreateSchema } from "@/lib/schemas/api-token";

type Context = { params: Promise<{ workspace: string }> };

/** The caller's own tokens in this workspace, without secrets. */
export const GET = apiRoute<Context>(async (_request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read");
  return Response.json({ tokens: await listApiTokens(getDatabase(), { workspaceId: access.workspace.id, userId: access.user.id }) });
});

/** Creates a token acting as the caller in this workspace; 201 { id, name, token }: the secret is shown only here. */
export const POST = apiRoute<Context>(async (request, { params }) => {
  const access = await requireWorkspaceAccess((await params).workspace, "workspace.read", { sessionOnly: true });
  const { name } = apiTokenCreateSchema.parse(await readJsonBody(request, 10_000));
  const created = await createApiToken(getDatabase(), { workspaceId: access.workspace.id, userId: access.user.id, name });
  return Response.json({ id: created.id, name: created.name, createdAt: created.createdAt, token: created.token }, { status: 201 });
});
