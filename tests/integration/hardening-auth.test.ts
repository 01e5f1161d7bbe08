// Issue #10 (hardening) and #7 (API tokens) against a real PostgreSQL: sign-in limits, sessions, tokens,
// the scoped development mailbox, and invitations that must leave nothing behind.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import bcrypt from "bcryptjs";
import { and, eq } from "drizzle-orm";
import type { Database } from "@/db/client";
import { apiTokens, auditEvents, capturedMail, memberships, users, verificationTokens, workspaces } from "@/db/schema";
import { beginSignInAttempt, countRecentSignInLinks, createSession, endSession, isSessionActive, markSignInSucceeded } from "@/db/queries/users";
import { createApiToken, findApiTokenGrant, listApiTokens, revokeApiToken } from "@/db/queries/tokens";
import { changeMemberRole, removeMember } from "@/db/queries/members";
import { createInvitation } from "@/db/queries/invitations";
import { listWorkspaceMail } from "@/db/queries/mail";
import { hashToken } from "@/lib/secrets/tokens";
import { hashPassword } from "@/lib/secrets/password";
import { signInLimits } from "@/lib/schemas/sign-in-limits";
import { startFakeSmtpServer } from "@/lib/mail/fake-smtp-server";
import { invitationMail, signInLinkMail } from "@/lib/mail/messages";
import { sendMail } from "@/lib/mail/transport";
import { acceptWithNewAccount } from "@/app/invitations/[token]/accept";
import { verifyCredentials } from "@/lib/auth/credentials";
import { migratedScratchDatabase } from "./support/database";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let wsA: string;
let wsB: string;
let adminA: string;
let viewerA: string;
let adminB: string;
let shared: string;

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  [{ id: wsA }, { id: wsB }] = await db.insert(workspaces).values([{ slug: "tarn-a", name: "Tarn A" }, { slug: "tarn-b", name: "Tarn B" }]).returning();
  [{ id: adminA }, { id: viewerA }, { id: adminB }, { id: shared }] = await db
    .insert(users)
    .values([{ email: "admin-a@example.test" }, { email: "viewer-a@example.test" }, { email: "admin-b@example.test", passwordHash: await hashPassword("b-password-long") }, { email: "shared@example.test" }])
    .returning();
  await db.insert(memberships).values([
    { userId: adminA, workspaceId: wsA, role: "admin" },
    { userId: viewerA, workspaceId: wsA, role: "viewer" },
    { userId: adminB, workspaceId: wsB, role: "admin" },
    { userId: shared, workspaceId: wsA, role: "engineer" },
    { userId: shared, workspaceId: wsB, role: "viewer" },
  ]);
});
afterAll(async () => scratch.close());

describe("failed sign-in limits (item 5)", () => {
  it("lets exactly the allowed number through when 30 attempts arrive at once", async () => {
    const results = await Promise.all(Array.from({ length: 30 }, () => beginSignInAttempt(db, { email: "parallel@example.test", client: "198.51.100.7" })));
    expect(results.filter((r) => r.allowed)).toHaveLength(signInLimits.perAddressAndClient);
  });

  it("does not lock out a correct password from a client that has not failed", async () => {
    const email = "target@example.test";
    for (let i = 0; i < signInLimits.perAddressAndClient; i++) expect((await beginSignInAttempt(db, { email, client: "attacker" })).allowed).toBe(true);
    expect(await beginSignInAttempt(db, { email, client: "attacker" })).toEqual({ allowed: false, reason: "address-and-client" });
    const owner = await beginSignInAttempt(db, { email, client: "owner" });
    expect(owner.allowed).toBe(true);
  });

  it("refuses, after many failures for one address, only the clients that took part", async () => {
    const email = "spread@example.test";
    for (let i = 0; i < signInLimits.perAddress; i++) expect((await beginSignInAttempt(db, { email, client: `bot-${i}` })).allowed).toBe(true);
    expect(await beginSignInAttempt(db, { email, client: "bot-0" })).toEqual({ allowed: false, reason: "address" });
    expect((await beginSignInAttempt(db, { email, client: "clean-client" })).allowed).toBe(true);
  });

  it("limits one client over all addresses, and a success restarts an address's count", async () => {
    for (let i = 0; i < signInLimits.perClient; i++) expect((await beginSignInAttempt(db, { email: `many-${i}@example.test`, client: "sprayer" })).allowed).toBe(true);
    expect(await beginSignInAttempt(db, { email: "fresh@example.test", client: "sprayer" })).toEqual({ allowed: false, reason: "client" });

    const email = "recovers@example.test";
    for (let i = 0; i < signInLimits.perAddressAndClient - 1; i++) await beginSignInAttempt(db, { email, client: "laptop" });
    const good = await beginSignInAttempt(db, { email, client: "laptop" });
    if (!good.allowed) throw new Error("expected the fifth attempt to be allowed");
    await new Promise((r) => setTimeout(r, 5));
    await markSignInSucceeded(db, good.attemptId);
    expect((await beginSignInAttempt(db, { email, client: "laptop" })).allowed).toBe(true);
  });

  it("counts sign-in links per address within the window", async () => {
    const now = new Date();
    const maxAge = signInLimits.linkMaxAgeHours * 3_600_000;
    await db.insert(verificationTokens).values([
      { identifier: "links@example.test", token: "t1", expires: new Date(now.getTime() + maxAge - 60_000) },
      { identifier: "links@example.test", token: "t2", expires: new Date(now.getTime() + maxAge - 2 * 60_000) },
      { identifier: "links@example.test", token: "old", expires: new Date(now.getTime() + maxAge - (signInLimits.windowMinutes + 5) * 60_000) },
    ]);
    expect(await countRecentSignInLinks(db, "Links@Example.test", now)).toBe(2);
  });
});

describe("sessions end on the server (item 8)", () => {
  it("sign-out ends the session row", async () => {
    await createSession(db, { userId: viewerA, sessionId: "session-1", expires: new Date(Date.now() + 60_000) });
    expect(await isSessionActive(db, { userId: viewerA, sessionId: "session-1" })).toBe(true);
    expect(await isSessionActive(db, { userId: adminA, sessionId: "session-1" })).toBe(false);
    await endSession(db, "session-1");
    expect(await isSessionActive(db, { userId: viewerA, sessionId: "session-1" })).toBe(false);
  });

  it("removal from the last workspace ends every session; removal from one of two does not", async () => {
    await createSession(db, { userId: shared, sessionId: "shared-1", expires: new Date(Date.now() + 60_000) });
    await removeMember(db, { workspaceId: wsB, userId: shared, actorUserId: adminB });
    expect(await isSessionActive(db, { userId: shared, sessionId: "shared-1" })).toBe(true);
    const [{ id: loner }] = await db.insert(users).values({ email: "loner@example.test" }).returning();
    await db.insert(memberships).values({ userId: loner, workspaceId: wsB, role: "viewer" });
    await createSession(db, { userId: loner, sessionId: "loner-1", expires: new Date(Date.now() + 60_000) });
    await removeMember(db, { workspaceId: wsB, userId: loner, actorUserId: adminB });
    expect(await isSessionActive(db, { userId: loner, sessionId: "loner-1" })).toBe(false);
  });
});

describe("API tokens (issue #7)", () => {
  it("stores only the hash, acts with the owner's current role, and stops on revocation", async () => {
    const created = await createApiToken(db, { workspaceId: wsA, userId: viewerA, name: "notebook" });
    expect(created.token).toMatch(/^spw_[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, created.id));
    expect(row.tokenHash).toBe(hashToken(created.token));
    expect(JSON.stringify(row)).not.toContain(created.token);
    expect(JSON.stringify(await listApiTokens(db, { workspaceId: wsA, userId: viewerA }))).not.toContain(row.tokenHash);

    expect(await findApiTokenGrant(db, created.token)).toMatchObject({ userId: viewerA, role: "viewer", workspace: { slug: "tarn-a" } });
    await changeMemberRole(db, { workspaceId: wsA, userId: viewerA, role: "engineer", actorUserId: adminA });
    expect((await findApiTokenGrant(db, created.token))?.role).toBe("engineer");
    expect(await findApiTokenGrant(db, `${created.token}x`)).toBeNull();

    // Another member cannot revoke it; another workspace's admin cannot see it; its owner can.
    expect(await revokeApiToken(db, { workspaceId: wsA, tokenId: created.id, actorUserId: shared, anyOwner: false })).toBeNull();
    expect(await revokeApiToken(db, { workspaceId: wsB, tokenId: created.id, actorUserId: adminB, anyOwner: true })).toBeNull();
    expect(await findApiTokenGrant(db, created.token)).not.toBeNull();
    expect(await revokeApiToken(db, { workspaceId: wsA, tokenId: created.id, actorUserId: viewerA, anyOwner: false })).not.toBeNull();
    expect(await findApiTokenGrant(db, created.token)).toBeNull();

    const actions = (await db.select().from(auditEvents).where(and(eq(auditEvents.workspaceId, wsA), eq(auditEvents.subjectId, created.id)))).map((e) => e.action);
    expect(actions.sort()).toEqual(["token.created", "token.revoked"]);
  });

  it("stops working when its owner is removed from the workspace", async () => {
    const [{ id: temp }] = await db.insert(users).values({ email: "temp@example.test" }).returning();
    await db.insert(memberships).values({ userId: temp, workspaceId: wsA, role: "engineer" });
    const { token } = await createApiToken(db, { workspaceId: wsA, userId: temp, name: "ci" });
    expect(await findApiTokenGrant(db, token)).not.toBeNull();
    await removeMember(db, { workspaceId: wsA, userId: temp, actorUserId: adminA });
    expect(await findApiTokenGrant(db, token)).toBeNull();
  });
});

describe("development mailbox (item 1)", () => {
  it("shows a workspace only its own mail and never anyone's sign-in link", async () => {
    const port = 20_000 + Math.floor(Math.random() * 20_000);
    const smtp = await startFakeSmtpServer({ port, databaseUrl: scratch.url });
    const saved = { url: process.env.SMTP_URL, fake: process.env.SPILLWAY_FAKE_MAIL };
    process.env.SMTP_URL = `smtp://127.0.0.1:${port}`;
    process.env.SPILLWAY_FAKE_MAIL = "1";
    try {
      const expiresAt = new Date(Date.now() + 86_400_000);
      await sendMail(signInLinkMail("admin-b@example.test", "http://localhost:3000/api/v1/auth/callback/email-link?token=secret-b"));
      await sendMail(signInLinkMail("viewer-a@example.test", "http://localhost:3000/api/v1/auth/callback/email-link?token=secret-a"));
      await sendMail(invitationMail({ to: "newcomer@example.test", url: "http://localhost:3000/invitations/token-for-a", workspaceId: wsA, workspaceName: "Tarn A", role: "viewer", invitedBy: "Admin A", expiresAt }));
      await sendMail(invitationMail({ to: "other@example.test", url: "http://localhost:3000/invitations/token-for-b", workspaceId: wsB, workspaceName: "Tarn B", role: "admin", invitedBy: "Admin B", expiresAt }));
      // Tagged with A but addressed to someone who is not a member of A: not shown in A.
      await sendMail({ to: "admin-b@example.test", subject: "Run finished", text: "notice", workspaceId: wsA, kind: "run-finished" });
      await sendMail({ to: "admin-a@example.test", subject: "Run finished", text: "notice for a member", workspaceId: wsA, kind: "run-finished" });
      for (let i = 0; i < 100 && (await db.select().from(capturedMail)).length < 6; i++) await new Promise((r) => setTimeout(r, 50));
      expect(await db.select().from(capturedMail)).toHaveLength(6);

      const inA = await listWorkspaceMail(db, wsA);
      expect(inA.map((m) => m.textBody).join("\n")).not.toMatch(/secret-|token-for-b/);
      expect(inA.map((m) => m.envelopeTo[0]).sort()).toEqual(["admin-a@example.test", "newcomer@example.test"]);
      const inB = await listWorkspaceMail(db, wsB);
      expect(inB.map((m) => m.envelopeTo[0])).toEqual(["other@example.test"]);
      expect(inB.map((m) => m.textBody).join("\n")).not.toMatch(/secret-|token-for-a/);
    } finally {
      process.env.SMTP_URL = saved.url;
      process.env.SPILLWAY_FAKE_MAIL = saved.fake;
      await smtp.close();
    }
  });
});

describe("invitations (item 6)", () => {
  it("the new-account form does not attach an existing account, so no membership is left behind", async () => {
    const { token } = await createInvitation(db, { workspaceId: wsA, email: "admin-b@example.test", role: "admin", invitedBy: adminA }, async () => {});
    const result = await acceptWithNewAccount(db, { token, name: "Intruder", password: "wrong-password-1", confirmPassword: "wrong-password-1" });
    expect(result).toMatchObject({ ok: false, message: expect.stringMatching(/already has a Spillway account/) });
    expect(await db.select().from(memberships).where(and(eq(memberships.userId, adminB), eq(memberships.workspaceId, wsA)))).toHaveLength(0);
    // A newcomer's form still works.
    const fresh = await createInvitation(db, { workspaceId: wsA, email: "newbie@example.test", role: "viewer", invitedBy: adminA }, async () => {});
    expect(await acceptWithNewAccount(db, { token: fresh.token, name: "Newbie", password: "newbie-password", confirmPassword: "newbie-password" })).toMatchObject({ ok: true });
  });
});

describe("password sign-in answers alike for unknown addresses (item 9)", () => {
  it("checks one bcrypt hash of the same cost whether or not the address has an account", async () => {
    const compared: string[] = [];
    const original = bcrypt.compare;
    const spy = vi.spyOn(bcrypt, "compare").mockImplementation(async (password: string, hash: string) => {
      compared.push(hash);
      return original(password, hash);
    });
    try {
      expect(await verifyCredentials(db, { email: "admin-b@example.test", password: "not-it-at-all", client: "timing" })).toEqual({ ok: false, reason: "invalid-credentials" });
      expect(await verifyCredentials(db, { email: "ghost@example.test", password: "not-it-at-all", client: "timing" })).toEqual({ ok: false, reason: "invalid-credentials" });
      expect(await verifyCredentials(db, { email: "admin-a@example.test", password: "not-it-at-all", client: "timing" })).toEqual({ ok: false, reason: "invalid-credentials" }); // no password set
      expect(compared).toHaveLength(3);
      expect(compared.map((h) => h.slice(0, 7))).toEqual(["$2b$11$", "$2b$11$", "$2b$11$"]);
      expect(await verifyCredentials(db, { email: "admin-b@example.test", password: "b-password-long", client: "timing" })).toMatchObject({ ok: true, user: { id: adminB } });
    } finally {
      spy.mockRestore();
    }
  });
});
