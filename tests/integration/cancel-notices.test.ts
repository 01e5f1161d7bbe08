// The cancel notice, end to end: the cancel routes (as the web calls them), the real queue and an in-process
// worker on a scratch PostgreSQL, and the fake SMTP receiver. Someone other than the submitter cancelling a
// run or a sweep e-mails the submitter who cancelled it, when, and what was kept; cancelling one's own work,
// or having notices turned off, sends nothing.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { and, asc, eq, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { createBoss } from "@/db/queue";
import { auditEvents, capturedMail, memberships, runs, sweeps, users } from "@/db/schema";
import { queues } from "@/lib/jobs/contracts";
import { startFakeSmtpServer } from "@/lib/mail/fake-smtp-server";
import type { RunningWorker } from "@/worker/main";
import { call, createTeam, state, type Team } from "./support/api-harness";
import { migratedScratchDatabase } from "./support/database";
import { freePort, readChunks, waitFor } from "./support/worker";

vi.mock("next/headers", async () => (await import("./support/api-harness")).headersModule);
vi.mock("@/lib/auth/config", async () => (await import("./support/api-harness")).authModule);
vi.mock("@/db/client", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).databaseModule }));
vi.mock("@/db/queue", async (original) => ({ ...(await original<object>()), ...(await import("./support/api-harness")).queueModule }));

const runList = await import("@/app/api/v1/workspaces/[workspace]/runs/route");
const runCancel = await import("@/app/api/v1/workspaces/[workspace]/runs/[id]/cancel/route");
const sweepList = await import("@/app/api/v1/workspaces/[workspace]/sweeps/route");
const sweepCancel = await import("@/app/api/v1/workspaces/[workspace]/sweeps/[id]/cancel/route");
const preferences = await import("@/app/api/v1/preferences/route");

const appUrl = "http://localhost:3998";
let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let boss: PgBoss;
let smtp: { close(): Promise<void> };
let worker: RunningWorker | undefined;
let team: Team;
/** A: the submitter (the team's engineer). B: a second engineer of the same workspace. Q: an engineer with notices off. */
let a: string;
let b: string;
let q: string;
const bName = "Second Engineer of spill";

/** The worker starts on first use, so the first sweep test can cancel a sweep that is certainly still queued. */
async function ensureWorker(): Promise<RunningWorker> {
  if (!worker) {
    const { startWorker } = await import("@/worker/main");
    worker = await startWorker(scratch.url, { threads: 2, log: process.env.SPILLWAY_TEST_LOG ? console.log : () => {} });
  }
  return worker;
}

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  boss = await createBoss(scratch.url, "web");
  state.db = db;
  state.boss = boss;
  team = await createTeam(db, "spill");
  a = team.users.engineer;
  const [second, quiet] = await db
    .insert(users)
    .values([
      { email: "second@spill.test", name: bName },
      { email: "quiet@spill.test", name: "Quiet Engineer of spill" },
    ])
    .returning();
  b = second.id;
  q = quiet.id;
  await db.insert(memberships).values([
    { userId: b, workspaceId: team.workspaceId, role: "engineer" },
    { userId: q, workspaceId: team.workspaceId, role: "engineer" },
  ]);
  // Q turns notices off through the preferences route, as the settings page does.
  const off = await call(preferences.PUT, {}, { caller: { session: q }, method: "PUT", body: { notifyByEmail: false } });
  expect(off.status).toBe(200);
  const port = await freePort();
  smtp = await startFakeSmtpServer({ port, databaseUrl: scratch.url });
  Object.assign(process.env, { SMTP_URL: `smtp://127.0.0.1:${port}`, SPILLWAY_FAKE_MAIL: "1", APP_URL: appUrl });
});

afterAll(async () => {
  await worker?.stop(1000);
  await boss?.stop({ graceful: false, wait: true });
  await smtp?.close();
  await scratch?.close();
});

/** 20 chunks of 2 replications of 200 000 calls: a few seconds on two threads, long enough to cancel mid-run. */
const longRun = (seed: number) => ({
  servers: 10,
  arrivals: { process: "poisson", rate: 8 },
  holding: { law: "exponential", mean: 1 },
  run: { seed, replications: 40, callsPerReplication: 200_000, chunkReplications: 2 },
});

/** Six points of one chunk each (2 replications of 1 000 000 calls): they finish a few at a time. */
const sweepBody = (seed: number) => ({
  scenario: { ...longRun(seed), run: { seed, replications: 2, callsPerReplication: 1_000_000 } },
  parameter: "offeredTraffic",
  values: [5, 6, 7, 8, 9, 10],
  name: `load curve ${seed}`,
});

async function submitRun(by: string, seed: number): Promise<string> {
  const r = await call(runList.POST, { workspace: team.slug }, { caller: { session: by }, body: { scenario: longRun(seed), name: `trunk ${seed}` } });
  expect(r.status).toBe(202);
  return r.body.id;
}

async function submitSweep(by: string, seed: number): Promise<string> {
  const r = await call(sweepList.POST, { workspace: team.slug }, { caller: { session: by }, body: sweepBody(seed) });
  expect(r.status).toBe(202);
  return r.body.id;
}

async function cancel(subject: "run" | "sweep", id: string, by: string) {
  const r = await call(subject === "run" ? runCancel.POST : sweepCancel.POST, { workspace: team.slug, id }, { caller: { session: by }, method: "POST" });
  expect(r.status).toBe(200);
  expect(r.body).toEqual({ id, status: "cancelled" });
}

/** The notify job about `id` has been worked (so any mail it sent is already in captured_mail). */
async function noticeWorked(id: string): Promise<void> {
  await waitFor(`the notify job for ${id}`, async () => {
    const jobs = await db.execute<{ state: string }>(sql`select state::text as state from pgboss.job where name = ${queues.notify} and data->>'id' = ${id}`);
    return jobs.rows.length > 0 && jobs.rows.every((j) => j.state === "completed");
  }, 60_000);
}

const mailAbout = async (id: string) => (await db.select().from(capturedMail).orderBy(asc(capturedMail.id))).filter((m) => m.textBody.includes(id));

const cancelledAt = async (subject: "run" | "sweep", id: string) => {
  const [event] = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectId, id), eq(auditEvents.action, `${subject}.cancelled`)));
  return event;
};

describe("cancel notices for sweeps", () => {
  it("B cancels A's sweep before it started: A is told who and when, and that nothing was kept", async () => {
    const id = await submitSweep(a, 31); // no worker yet: the sweep is certainly still queued
    await cancel("sweep", id, b);
    await ensureWorker();
    await noticeWorked(id);
    const mail = await mailAbout(id);
    expect(mail).toHaveLength(1);
    const [notice] = mail;
    expect(notice.kind).toBe("sweep-cancelled");
    expect(notice.workspaceId).toBe(team.workspaceId);
    expect(notice.envelopeTo).toEqual(["engineer@spill.test"]);
    expect(notice.subject).toBe(`Your sweep "load curve 31" was cancelled by ${bName}`);
    const event = await cancelledAt("sweep", id);
    expect(event.actorUserId).toBe(b);
    expect(notice.textBody).toContain(`${bName} cancelled your sweep "load curve 31" in "Test spill" on ${event.createdAt.toUTCString()}.`);
    expect(notice.textBody).toContain("Nothing was kept: the sweep had not started.");
    expect(notice.textBody).toContain(`${appUrl}/w/spill/sweeps/${id}`);
  });

  it("B cancels A's running sweep: one notice, once every point has settled, counting the finished points", async () => {
    await ensureWorker();
    const id = await submitSweep(a, 32);
    await waitFor("one point finished", async () => (await db.select().from(runs).where(and(eq(runs.sweepId, id), eq(runs.status, "succeeded")))).length > 0, 60_000, 20);
    await cancel("sweep", id, b);
    await waitFor("the sweep's partial summary", async () => (await db.select().from(sweeps).where(eq(sweeps.id, id)))[0].result !== null, 60_000);
    await noticeWorked(id);
    const points = await db.select().from(runs).where(eq(runs.sweepId, id));
    const finished = points.filter((p) => p.status === "succeeded").length;
    expect(points).toHaveLength(6);
    expect(finished).toBeGreaterThanOrEqual(1);
    expect(finished).toBeLessThan(6);
    const mail = await mailAbout(id);
    expect(mail.map((m) => m.kind)).toEqual(["sweep-cancelled"]);
    const event = await cancelledAt("sweep", id);
    expect(mail[0].envelopeTo).toEqual(["engineer@spill.test"]);
    expect(mail[0].textBody).toContain(`${bName} cancelled your sweep "load curve 32" in "Test spill" on ${event.createdAt.toUTCString()}.`);
    expect(mail[0].textBody).toContain(`Kept: ${finished} of 6 points had finished; points cut short keep their partial results.`);
  });

  it("A cancels A's own sweep: no mail", async () => {
    await ensureWorker();
    const id = await submitSweep(a, 33);
    await cancel("sweep", id, a);
    await noticeWorked(id);
    expect(await mailAbout(id)).toEqual([]);
  });

  it("B cancels the sweep of a submitter with notices off: no mail", async () => {
    await ensureWorker();
    const id = await submitSweep(q, 34);
    await cancel("sweep", id, b);
    await noticeWorked(id);
    expect(await mailAbout(id)).toEqual([]);
  });
});

describe("cancel notices for runs", () => {
  it("B cancels A's run mid-way: A is told who, when, and the partial result (replications done and the estimate)", async () => {
    await ensureWorker();
    const id = await submitRun(a, 41);
    await waitFor("chunks 0 and 1 finished", async () => (await readChunks(db, id)).filter((c) => c.aggregate && c.chunk < 2).length === 2, 60_000, 20);
    await cancel("run", id, b);
    await noticeWorked(id);
    const [run] = await db.select().from(runs).where(eq(runs.id, id));
    expect(run.status).toBe("cancelled");
    expect(run.partial).toBe(true);
    expect(run.replicationsDone).toBeGreaterThanOrEqual(4);
    expect(run.replicationsDone).toBeLessThan(40);
    const mail = await mailAbout(id);
    expect(mail).toHaveLength(1);
    const [notice] = mail;
    expect(notice.kind).toBe("run-cancelled");
    expect(notice.workspaceId).toBe(team.workspaceId);
    expect(notice.envelopeTo).toEqual(["engineer@spill.test"]);
    expect(notice.subject).toBe(`Your run "trunk 41" was cancelled by ${bName}`);
    const event = await cancelledAt("run", id);
    expect(event.actorUserId).toBe(b);
    expect(notice.textBody).toContain(`${bName} cancelled your run "trunk 41" in "Test spill" on ${event.createdAt.toUTCString()}.`);
    const result = run.result as { replications: number; confidence: number; callCongestion: { estimate: number } };
    expect(result.replications).toBe(run.replicationsDone);
    expect(notice.textBody).toContain(`Kept as a partial result: ${run.replicationsDone} of ${run.replicationsPlanned} planned replications done, call congestion `);
    const shown = /call congestion ([\d.]+)% \(95% interval ([\d.]+)% to ([\d.]+)%\)\./.exec(notice.textBody);
    expect(shown).not.toBeNull();
    // The stored partial estimate, as a percentage to 3 significant figures.
    expect(shown![1]).toBe(String(Number((result.callCongestion.estimate * 100).toPrecision(3))));
    expect(notice.textBody).toContain(`${appUrl}/w/spill/runs/${id}`);
  });

  it("A cancels A's own run: no mail", async () => {
    await ensureWorker();
    const id = await submitRun(a, 42);
    await cancel("run", id, a);
    await noticeWorked(id);
    expect(await mailAbout(id)).toEqual([]);
  });

  it("B cancels the run of a submitter with notices off: no mail", async () => {
    await ensureWorker();
    const id = await submitRun(q, 43);
    await cancel("run", id, b);
    await noticeWorked(id);
    expect(await mailAbout(id)).toEqual([]);
  });
});
