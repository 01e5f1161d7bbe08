import { z } from "zod";

/** PUT /api/v1/preferences: the whole settings object. */
export const preferencesSchema = z.strictObject({
  notifyByEmail: z.boolean({ error: "must be true or false" }),
});
export type PreferencesInput = z.input<typeof preferencesSchema>;
