// Runs through the real queue (PostgreSQL + pg-boss) with an in-process worker: CLI equality,
// cancel, a bad scenario, a retried chunk, progress, and the finish notice by e-mail.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { createBoss } from "@/db/queue";
import { auditEvents, capturedMail, userPreferences } from "@/db/schema";
import { startFakeSmtpServer } from "@/lib/mail/fake-smtp-server";
import { parseScenario, runScenario, type ScenarioInput } from "@/lib/simulation/node";
import { startWorker, type RunningWorker } from "@/worker/main";
import { migratedScratchDatabase } from "./support/database";
import { canonicalJson, cancelTestRun, createWorkspace, freePort, readChunks, readRun, submitTestRun, waitFor, waitForRunStatus } from "./support/worker";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let boss: PgBoss;
let worker: RunningWorker;
let smtp: { close(): Promise<void> };
let owner: Awaited<ReturnType<typeof createWorkspace>>;
const appUrl = "http://localhost:3999";

/** Small: 12 replications of 20 000 calls in 4 chunks of 3. */
const trunk: ScenarioInput = {
  servers: 10,
  arrivals: { process: "poisson", rate: 8 },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 7, replications: 12, callsPerReplication: 20_000, chunkReplications: 3 },
};

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  const port = await freePort();
  smtp = await startFakeSmtpServer({ port, databaseUrl: scratch.url });
  Object.assign(process.env, { SMTP_URL: `smtp://127.0.0.1:${port}`, SPILLWAY_FAKE_MAIL: "1", APP_URL: appUrl });
  boss = await createBoss(scratch.url, "web");
  worker = await startWorker(scratch.url, { threads: 2, log: process.env.SPILLWAY_TEST_LOG ? console.log : () => {} });
  owner = await createWorkspace(db, "weir");
});

afterAll(async () => {
  await worker?.stop(1000);
  await boss?.stop({ graceful: false, wait: true });
  await smtp?.close();
  await scratch?.close();
});

describe("a run through the queue", () => {
  it("returns exactly the CLI's result for the same scenario and seed (bit-identical JSON)", async () => {
    const runId = await submitTestRun(db, boss, owner, trunk);
    const run = await waitForRunStatus(db, runId, ["succeeded", "failed"]);
    expect(run.error).toBeNull();
    const cli = await runScenario(parseScenario(trunk), { threads: 1 });
    expect(canonicalJson(run.result)).toBe(canonicalJson(cli));
    expect(run.progress).toBe(1);
    expect(run.replicationsDone).toBe(12);
    // References computed once, when the run started, and stored beside the estimates.
    expect(run.references).toEqual(cli.references);
    const chunks = await readChunks(db, runId);
    expect(chunks.map((c) => [c.chunk, c.firstReplication, c.replications, c.attempts])).toEqual([0, 1, 2, 3].map((c) => [c, 3 * c, 3, 1]));
    const actions = (await db.select().from(auditEvents).where(eq(auditEvents.subjectId, runId))).map((e) => e.action);
    expect(actions).toEqual(["run.succeeded"]);
  });

  it("stops a precision run at the same checkpoint as the CLI", async () => {
    const scenario: ScenarioInput = {
      servers: 6,
      arrivals: { process: "batch", rate: 2, batchSize: { law: "geometric", mean: 2 } },
      holding: { law: "exponential", mean: 1 },
      run: { seed: 3, replications: 4, callsPerReplication: 5_000, chunkReplications: 2, precision: { relativeHalfWidth: 0.04, maxCalls: 600_000 } },
    };
    const runId = await submitTestRun(db, boss, owner, scenario);
    const run = await waitForRunStatus(db, runId, ["succeeded", "failed"]);
    const cli = await runScenario(parseScenario(scenario), { threads: 2 });
    expect(canonicalJson(run.result)).toBe(canonicalJson(cli));
    expect(cli.stopReason).not.toBe("planned");
  });

  it("writes progress while a run goes on", async () => {
    const scenario = { ...trunk, run: { ...trunk.run, seed: 8, replications: 8, callsPerReplication: 150_000, chunkReplications: 2 } };
    const runId = await submitTestRun(db, boss, owner, scenario);
    const seen = await waitFor("progress between 0 and 1", async () => {
      const run = await readRun(db, runId);
      return run.status === "running" && run.progress > 0 && run.progress < 1 ? run.progress : undefined;
    }, 20_000, 20);
    expect(seen).toBeGreaterThan(0);
    const run = await waitForRunStatus(db, runId, ["succeeded"]);
    expect(run.progress).toBe(1);
  });
});

describe("cancel, failure and retry", () => {
  it("cancel mid-run: running chunks stop, the finished prefix is kept as a partial result", async () => {
    const scenario = { ...trunk, run: { ...trunk.run, seed: 9, replications: 40, callsPerReplication: 100_000, chunkReplications: 2 } };
    const runId = await submitTestRun(db, boss, owner, scenario);
    await waitFor("chunks 0 and 1 finished", async () => (await readChunks(db, runId)).filter((c) => c.aggregate && c.chunk < 2).length === 2, 30_000, 20);
    await cancelTestRun(db, boss, runId);
    const run = await waitFor("the partial result", async () => {
      const r = await readRun(db, runId);
      return r.result ? r : undefined;
    });
    expect(run.status).toBe("cancelled");
    expect(run.partial).toBe(true);
    const result = run.result as { replications: number; stopReason: string; perReplication: { calls: number[] } };
    expect(result.stopReason).toBe("cancelled");
    expect(result.replications).toBeGreaterThanOrEqual(4);
    expect(result.replications).toBeLessThan(40);
    expect(result.perReplication.calls).toHaveLength(result.replications);
    // Running chunks notice the cancel at their next progress write (about 1 s) and stop.
    await waitFor("no chunk running in the worker", async () => worker.context.running.size === 0, 5_000);
    const chunks = await readChunks(db, runId);
    expect(chunks.filter((c) => c.aggregate).length).toBeLessThan(20);
  });

  it("a bad scenario fails the run cleanly with the field named, and nothing half-written", async () => {
    const runId = await submitTestRun(db, boss, owner, { ...trunk, servers: 0 });
    const run = await waitForRunStatus(db, runId, ["failed", "succeeded"]);
    expect(run.status).toBe("failed");
    expect(run.error).toMatch(/invalid scenario: servers: must be >= 1/);
    expect(await readChunks(db, runId)).toHaveLength(0);
    expect(run.result).toBeNull();
    const [audit] = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectId, runId), eq(auditEvents.action, "run.failed")));
    expect(audit.detail).toMatchObject({ field: "servers" });
  });

  it("a throwing chunk is retried by the queue and the run still equals the CLI's", async () => {
    process.env.SPILLWAY_TEST_FAIL_CHUNK = "1:1"; // chunk 1 throws on its first attempt (test-only hook)
    try {
      const scenario = { ...trunk, run: { ...trunk.run, seed: 10 } };
      const runId = await submitTestRun(db, boss, owner, scenario);
      const run = await waitForRunStatus(db, runId, ["succeeded", "failed"]);
      expect(run.status).toBe("succeeded");
      expect(canonicalJson(run.result)).toBe(canonicalJson(await runScenario(parseScenario(scenario))));
      const chunks = await readChunks(db, runId);
      expect(chunks.map((c) => c.attempts)).toEqual([1, 2, 1, 1]);
      const retries = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectId, runId), eq(auditEvents.action, "run.chunk-retried")));
      expect(retries.map((r) => r.detail)).toEqual([expect.objectContaining({ chunk: 1, attempt: 1, error: "injected test failure of chunk 1, attempt 1" })]);
    } finally {
      delete process.env.SPILLWAY_TEST_FAIL_CHUNK;
    }
  });
});

describe("notices", () => {
  it("e-mails the submitter when a run finishes, with a link, unless they turned notices off", async () => {
    const runId = await submitTestRun(db, boss, owner, { ...trunk, run: { ...trunk.run, seed: 11 } });
    await waitForRunStatus(db, runId, ["succeeded"]);
    const mail = await waitFor("the finish notice", async () => {
      const rows = await db.select().from(capturedMail).where(eq(capturedMail.kind, "run-succeeded"));
      return rows.find((m) => m.textBody.includes(runId));
    });
    expect(mail.envelopeTo).toEqual(["weir@example.test"]);
    expect(mail.subject).toMatch(/finished/);
    expect(mail.textBody).toContain(`${appUrl}/w/weir/runs/${runId}`);
    expect(mail.textBody).toMatch(/Call congestion [\d.]+% \(95% interval/);

    const quiet = await createWorkspace(db, "sluice");
    await db.insert(userPreferences).values({ userId: quiet.userId, notifyByEmail: false });
    const quietRun = await submitTestRun(db, boss, quiet, { ...trunk, run: { ...trunk.run, seed: 12 } });
    await waitForRunStatus(db, quietRun, ["succeeded"]);
    // The notify job is queued in the same transaction as the finish; give it time to be worked.
    const failedRun = await submitTestRun(db, boss, owner, { ...trunk, holding: { law: "exponential", mean: -1 } });
    await waitFor("the failure notice", async () => (await db.select().from(capturedMail).where(eq(capturedMail.kind, "run-failed"))).find((m) => m.textBody.includes(failedRun)));
    const all = await db.select().from(capturedMail);
    expect(all.filter((m) => m.envelopeTo.includes("sluice@example.test"))).toHaveLength(0);
  });
});
