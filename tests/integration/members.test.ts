import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import type { Database } from "@/db/client";
import { auditEvents, memberships, users, workspaces } from "@/db/schema";
import { changeMemberRole, listMembers, MembershipError, removeMember } from "@/db/queries/members";
import { migratedScratchDatabase } from "./support/database";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let ws: string;
let other: string;
let admin: string;
let engineer: string;

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  [{ id: ws }, { id: other }] = await db.insert(workspaces).values([{ slug: "weir", name: "Weir" }, { slug: "sluice", name: "Sluice" }]).returning();
  [{ id: admin }, { id: engineer }] = await db.insert(users).values([{ email: "a@example.test" }, { email: "e@example.test" }]).returning();
  await db.insert(memberships).values([
    { userId: admin, workspaceId: ws, role: "admin" },
    { userId: engineer, workspaceId: ws, role: "engineer" },
    { userId: engineer, workspaceId: other, role: "admin" },
  ]);
});
afterAll(async () => scratch.close());

describe("member management", () => {
  it("never leaves a workspace without an admin, and changes nothing when it refuses", async () => {
    await expect(changeMemberRole(db, { workspaceId: ws, userId: admin, role: "viewer", actorUserId: admin })).rejects.toThrow(MembershipError);
    await expect(removeMember(db, { workspaceId: ws, userId: admin, actorUserId: admin })).rejects.toThrow(/only admin/);
    expect((await listMembers(db, ws)).find((m) => m.userId === admin)?.role).toBe("admin");
    expect(await db.select().from(auditEvents)).toHaveLength(0);
  });

  it("changes a role and removes a member with audit events", async () => {
    expect(await changeMemberRole(db, { workspaceId: ws, userId: engineer, role: "admin", actorUserId: admin })).toMatchObject({ role: "admin" });
    // Now there are two admins, so the first may step down.
    expect(await changeMemberRole(db, { workspaceId: ws, userId: admin, role: "reviewer", actorUserId: admin })).toMatchObject({ role: "reviewer" });
    expect(await removeMember(db, { workspaceId: ws, userId: admin, actorUserId: engineer })).not.toBeNull();
    expect((await listMembers(db, ws)).map((m) => m.email)).toEqual(["e@example.test"]);
    const actions = (await db.select().from(auditEvents).where(eq(auditEvents.workspaceId, ws))).map((e) => e.action);
    expect(actions).toEqual(["member.role-changed", "member.role-changed", "member.removed"]);
  });

  it("does not touch members of another workspace", async () => {
    const [outsider] = await db.insert(users).values({ email: "o@example.test" }).returning();
    await db.insert(memberships).values({ userId: outsider.id, workspaceId: other, role: "viewer" });
    expect(await changeMemberRole(db, { workspaceId: ws, userId: outsider.id, role: "admin", actorUserId: engineer })).toBeNull();
    expect(await removeMember(db, { workspaceId: ws, userId: outsider.id, actorUserId: engineer })).toBeNull();
    const [row] = await db.select().from(memberships).where(and(eq(memberships.userId, outsider.id), eq(memberships.workspaceId, other)));
    expect(row.role).toBe("viewer");
  });
});
