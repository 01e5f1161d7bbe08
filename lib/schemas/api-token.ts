import { z } from "zod";

export const apiTokenCreateSchema = z.strictObject({
  name: z
    .string({ error: "Name the token, e.g. the script or notebook that uses it." })
    .trim()
    .min(1, "Name the token, e.g. the script or notebook that uses it.")
    .max(80, "Use at most 80 characters."),
});
export type ApiTokenCreateInput = z.input<typeof apiTokenCreateSchema>;
