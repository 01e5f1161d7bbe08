import { z } from "zod";
import { workspaceRoles } from "@/lib/auth/roles";
import { emailSchema } from "./account";

export const invitationCreateSchema = z.object({
  email: emailSchema,
  role: z.enum(workspaceRoles, { error: "Choose a role: admin, engineer, reviewer or viewer." }),
});
export type InvitationCreateInput = z.input<typeof invitationCreateSchema>;

export const invitationValidityDays = 7;

export const memberRoleChangeSchema = z.object({
  role: z.enum(workspaceRoles, { error: "Choose a role: admin, engineer, reviewer or viewer." }),
});
