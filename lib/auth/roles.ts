// Pure permission model: no database or framework imports, so the guard's decisions are unit-testable.
// The role list itself lives in lib/schemas/roles.ts, which db/ imports too.
import { z } from "zod";
import { workspaceRoles, type WorkspaceRole } from "../schemas/roles";

export { workspaceRoles, workspaceRoleSchema, type WorkspaceRole } from "../schemas/roles";

/** Everything the guard can be asked about. */
export const workspaceActions = [
  "workspace.read",
  "analytic.evaluate",
  "scenario.create",
  "run.create",
  "sweep.create",
  "upload.create",
  "review.comment",
  "review.decide",
  "member.read",
  "member.invite",
  "member.manage",
  "audit.read",
  "mailbox.read",
] as const;
export const workspaceActionSchema = z.enum(workspaceActions);
export type WorkspaceAction = z.infer<typeof workspaceActionSchema>;

const readerActions: WorkspaceAction[] = ["workspace.read", "analytic.evaluate"];

const permissions: Record<WorkspaceRole, ReadonlySet<WorkspaceAction>> = {
  admin: new Set(workspaceActions),
  engineer: new Set([...readerActions, "scenario.create", "run.create", "sweep.create", "upload.create", "review.comment"]),
  reviewer: new Set([...readerActions, "review.comment", "review.decide"]),
  viewer: new Set(readerActions),
};

export function roleAllows(role: WorkspaceRole, action: WorkspaceAction): boolean {
  return permissions[role].has(action);
}

export function allowedActions(role: WorkspaceRole): WorkspaceAction[] {
  return workspaceActions.filter((action) => permissions[role].has(action));
}

export const roleDescriptions: Record<WorkspaceRole, string> = {
  admin: "Manages members and invitations, and can do everything an engineer or reviewer can.",
  engineer: "Creates scenarios, simulation runs, sweeps and traffic uploads.",
  reviewer: "Reads everything, comments, and approves or requests changes on results.",
  viewer: "Reads scenarios, runs and results.",
};

export const actionDescriptions: Record<WorkspaceAction, string> = {
  "workspace.read": "Read scenarios, runs and results",
  "analytic.evaluate": "Evaluate closed-form blocking (Erlang B, Engset, equivalent random …)",
  "scenario.create": "Create and edit scenarios",
  "run.create": "Queue simulation runs",
  "sweep.create": "Queue parameter sweeps",
  "upload.create": "Upload measured traffic",
  "review.comment": "Comment on results",
  "review.decide": "Approve results or request changes",
  "member.read": "See the member list",
  "member.invite": "Invite people by e-mail",
  "member.manage": "Change roles and remove members",
  "audit.read": "Read the audit log",
  "mailbox.read": "Read the development mailbox",
};
