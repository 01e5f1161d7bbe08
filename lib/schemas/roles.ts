// The workspace roles, pure: imported by db/ (the enum column) and lib/auth (permissions) alike,
// so neither folder depends on the other.
import { z } from "zod";

export const workspaceRoles = ["admin", "engineer", "reviewer", "viewer"] as const;
export const workspaceRoleSchema = z.enum(workspaceRoles, { error: "Choose a role: admin, engineer, reviewer or viewer." });
export type WorkspaceRole = z.infer<typeof workspaceRoleSchema>;
