import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import type { Database } from "@/db/client";
import { auditEvents, invitations, memberships, users, workspaces } from "@/db/schema";
import {
  acceptInvitation,
  createInvitation,
  findInvitationInWorkspace,
  findOpenInvitationByToken,
  InvitationError,
  listOpenInvitations,
  revokeInvitation,
} from "@/db/queries/invitations";
import { findMembershipBySlug } from "@/db/queries/workspaces";
import { decideAccess } from "@/lib/auth/access";
import { verifyPassword } from "@/lib/secrets/password";
import { migratedScratchDatabase } from "./support/database";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let workspaceA: string;
let workspaceB: string;
let adminA: string;
let adminB: string;
const noDelivery = async () => {};

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  const [a, b] = await db.insert(workspaces).values([{ slug: "basin-a", name: "Basin A" }, { slug: "basin-b", name: "Basin B" }]).returning();
  workspaceA = a.id;
  workspaceB = b.id;
  const [ua, ub] = await db.insert(users).values([{ email: "admin-a@example.test" }, { email: "admin-b@example.test" }]).returning();
  adminA = ua.id;
  adminB = ub.id;
  await db.insert(memberships).values([
    { userId: adminA, workspaceId: workspaceA, role: "admin" },
    { userId: adminB, workspaceId: workspaceB, role: "admin" },
  ]);
});
afterAll(async () => scratch.close());

describe("invitation flow", () => {
  it("creates, mails, accepts once, and records each step", async () => {
    const delivered: string[] = [];
    const { invitation, token } = await createInvitation(db, { workspaceId: workspaceA, email: "new@example.test", role: "reviewer", invitedBy: adminA }, async (t) => {
      delivered.push(t);
    });
    expect(delivered).toEqual([token]);
    expect(invitation.tokenHash).not.toBe(token);
    expect((await listOpenInvitations(db, workspaceA)).map((i) => i.email)).toEqual(["new@example.test"]);
    const found = await findOpenInvitationByToken(db, token);
    expect(found.status).toBe("open");

    const accepted = await acceptInvitation(db, { token, name: "New Person", password: "long-enough-pass" });
    expect(accepted.role).toBe("reviewer");
    const membership = await findMembershipBySlug(db, accepted.userId, "basin-a");
    expect(membership?.role).toBe("reviewer");
    const [user] = await db.select().from(users).where(eq(users.id, accepted.userId));
    expect(await verifyPassword("long-enough-pass", user.passwordHash!)).toBe(true);

    await expect(acceptInvitation(db, { token, name: "Again", password: "long-enough-pass" })).rejects.toThrow(InvitationError);
    expect((await findOpenInvitationByToken(db, token)).status).toBe("accepted");
    const actions = (await db.select().from(auditEvents).where(eq(auditEvents.workspaceId, workspaceA))).map((e) => e.action);
    expect(actions).toEqual(expect.arrayContaining(["invitation.created", "invitation.accepted"]));
  });

  it("leaves nothing behind when the mail cannot be sent", async () => {
    const before = await db.select({ n: sql<number>`count(*)::int` }).from(invitations);
    const auditBefore = await db.select({ n: sql<number>`count(*)::int` }).from(auditEvents);
    await expect(
      createInvitation(db, { workspaceId: workspaceA, email: "unlucky@example.test", role: "viewer", invitedBy: adminA }, async () => {
        throw new Error("SMTP connection refused");
      }),
    ).rejects.toThrow("SMTP connection refused");
    expect(await db.select({ n: sql<number>`count(*)::int` }).from(invitations)).toEqual(before);
    expect(await db.select({ n: sql<number>`count(*)::int` }).from(auditEvents)).toEqual(auditBefore);
  });

  it("refuses expired and revoked links, and a failed acceptance writes nothing", async () => {
    const past = new Date(Date.now() - 8 * 86_400_000);
    const expired = await createInvitation(db, { workspaceId: workspaceA, email: "late@example.test", role: "viewer", invitedBy: adminA, now: past }, noDelivery);
    expect((await findOpenInvitationByToken(db, expired.token)).status).toBe("expired");
    await expect(acceptInvitation(db, { token: expired.token, name: "Late", password: "long-enough-pass" })).rejects.toThrow(/expired/);
    expect(await db.select().from(users).where(eq(users.email, "late@example.test"))).toHaveLength(0);

    const open = await createInvitation(db, { workspaceId: workspaceA, email: "withdrawn@example.test", role: "viewer", invitedBy: adminA }, noDelivery);
    expect(await revokeInvitation(db, { workspaceId: workspaceA, invitationId: open.invitation.id, actorUserId: adminA })).not.toBeNull();
    expect((await findOpenInvitationByToken(db, open.token)).status).toBe("revoked");
    await expect(acceptInvitation(db, { token: open.token, name: "W", password: "long-enough-pass" })).rejects.toThrow(InvitationError);
  });

  it("refuses to invite an existing member", async () => {
    await expect(
      createInvitation(db, { workspaceId: workspaceA, email: "admin-a@example.test", role: "viewer", invitedBy: adminA }, noDelivery),
    ).rejects.toThrow(/already a member/);
  });

  it("lets an existing user join another workspace without a new password", async () => {
    const { token } = await createInvitation(db, { workspaceId: workspaceB, email: "admin-a@example.test", role: "engineer", invitedBy: adminB }, noDelivery);
    const accepted = await acceptInvitation(db, { token });
    expect(accepted.userId).toBe(adminA);
    expect((await findMembershipBySlug(db, adminA, "basin-b"))?.role).toBe("engineer");
    expect((await findMembershipBySlug(db, adminA, "basin-a"))?.role).toBe("admin");
  });
});

describe("workspace isolation", () => {
  it("a user of workspace A gets 404 for workspace B and its records", async () => {
    const { invitation } = await createInvitation(db, { workspaceId: workspaceB, email: "b-only@example.test", role: "viewer", invitedBy: adminB }, noDelivery);
    const outsider = (await db.insert(users).values({ email: "outsider@example.test" }).returning())[0];
    await db.insert(memberships).values({ userId: outsider.id, workspaceId: workspaceA, role: "admin" });
    // The guard's inputs for B come from the database: no membership, so the decision is 404.
    const membership = await findMembershipBySlug(db, outsider.id, "basin-b");
    expect(membership).toBeNull();
    expect(decideAccess({ signedIn: true, role: membership?.role ?? null, action: "member.read" })).toMatchObject({ status: 404 });
    // Records are looked up within the caller's workspace, so B's invitation is not found from A.
    expect(await findInvitationInWorkspace(db, workspaceA, invitation.id)).toBeNull();
    expect(await findInvitationInWorkspace(db, workspaceB, invitation.id)).not.toBeNull();
    expect(await revokeInvitation(db, { workspaceId: workspaceA, invitationId: invitation.id, actorUserId: outsider.id })).toBeNull();
    expect((await findInvitationInWorkspace(db, workspaceB, invitation.id))?.revokedAt).toBeNull();
  });
});
