import { getDatabase } from "@/db/client";
import { findPreferences, savePreferences } from "@/db/queries/preferences";
import { requireUser } from "@/lib/auth/guard";
import { apiRoute, readJsonBody } from "@/lib/api/respond";
import type { Preferences } from "@/lib/jobs/api-types";
import { preferencesSchema } from "@/lib/schemas/preferences";

/** The signed-in person's own settings (e-mail notices when their runs and sweeps finish, fail or are cancelled by someone else). */
export const GET = apiRoute(async () => {
  const user = await requireUser();
  const body: Preferences = await findPreferences(getDatabase(), user.id);
  return Response.json(body);
});

export const PUT = apiRoute(async (request: Request) => {
  const user = await requireUser();
  const input = preferencesSchema.parse(await readJsonBody(request, 10_000));
  const body: Preferences = await savePreferences(getDatabase(), user.id, input);
  return Response.json(body);
});
