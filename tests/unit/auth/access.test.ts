import { describe, expect, it } from "vitest";
import { decideAccess } from "@/lib/auth/access";
import { allowedActions, roleAllows, workspaceActions, workspaceRoles, type WorkspaceAction, type WorkspaceRole } from "@/lib/auth/roles";

// The product's role table (issue: admin = members + everything; engineer creates scenarios, runs, sweeps,
// uploads; reviewer reads, comments, approves or requests changes; viewer reads). Written out in full
// here, independently of lib/auth/roles.ts, so a change to either shows up as a failure.
const expected: Record<WorkspaceRole, WorkspaceAction[]> = {
  admin: [...workspaceActions],
  engineer: ["workspace.read", "analytic.evaluate", "scenario.create", "run.create", "sweep.create", "upload.create", "review.comment"],
  reviewer: ["workspace.read", "analytic.evaluate", "review.comment", "review.decide"],
  viewer: ["workspace.read", "analytic.evaluate"],
};

describe("role guard decisions, every role × action", () => {
  for (const role of workspaceRoles) {
    for (const action of workspaceActions) {
      const allowed = expected[role].includes(action);
      it(`${role} ${allowed ? "may" : "may not"} ${action}`, () => {
        expect(roleAllows(role, action)).toBe(allowed);
        const decision = decideAccess({ signedIn: true, role, action });
        if (allowed) {
          expect(decision).toEqual({ allowed: true });
        } else {
          expect(decision).toMatchObject({ allowed: false, status: 403, code: "forbidden" });
          if (!decision.allowed) expect(decision.message).toContain(role);
        }
      });
    }
  }

  it("lists allowed actions in the table's order", () => {
    for (const role of workspaceRoles) expect(allowedActions(role)).toEqual(expected[role]);
  });

  it("answers 401 before anything else when nobody is signed in", () => {
    for (const action of workspaceActions) {
      expect(decideAccess({ signedIn: false, role: "admin", action })).toMatchObject({ status: 401, code: "unauthenticated" });
      expect(decideAccess({ signedIn: false, role: null, action })).toMatchObject({ status: 401 });
    }
  });

  it("answers 404, not 403, for a workspace the user is not a member of", () => {
    for (const action of workspaceActions) {
      expect(decideAccess({ signedIn: true, role: null, action })).toMatchObject({ status: 404, code: "not-found" });
    }
  });
});
