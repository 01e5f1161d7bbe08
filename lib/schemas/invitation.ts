import { z } from "zod";
import { workspaceRoleSchema } from "./roles";
import { emailSchema } from "./account";

export const invitationCreateSchema = z.object({
  email: emailSchema,
  role: workspaceRoleSchema,
});
export type InvitationCreateInput = z.input<typeof invitationCreateSchema>;

export const invitationValidityDays = 7;

export const memberRoleChangeSchema = z.object({ role: workspaceRoleSchema });
