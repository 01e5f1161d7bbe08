// Helpers for the worker and sweep integration tests: a workspace, submissions, waiting on rows.
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import path from "node:path";
import { eq } from "drizzle-orm";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { sendJob } from "@/db/queue";
import { runChunks, runs, sweeps, users, workspaces, memberships } from "@/db/schema";
import { queues } from "@/lib/jobs/contracts";
import { parseScenario, planRun, type ScenarioInput } from "@/lib/simulation/node";

export const projectRoot = path.resolve(__dirname, "../../..");

/** A free loopback port (for the fake SMTP receiver). */
export const freePort = () =>
  new Promise<number>((resolve) => {
    const server = createServer();
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });

export async function createWorkspace(db: Database, slug: string) {
  const [ws] = await db.insert(workspaces).values({ slug, name: `Test ${slug}` }).returning();
  const [user] = await db.insert(users).values({ email: `${slug}@example.test`, name: `Engineer ${slug}` }).returning();
  await db.insert(memberships).values({ userId: user.id, workspaceId: ws.id, role: "engineer" });
  return { workspaceId: ws.id, slug: ws.slug, userId: user.id };
}

/** What the web's submission does: the run row (queued, its plan) and a run-start job. Invalid scenarios are stored as given. */
export async function submitTestRun(db: Database, boss: PgBoss, owner: { workspaceId: string; userId: string }, scenario: ScenarioInput | Record<string, unknown>): Promise<string> {
  let plan: Record<string, unknown> = {};
  let replications = 0;
  try {
    const parsed = parseScenario(scenario);
    plan = planRun(parsed) as unknown as Record<string, unknown>;
    replications = parsed.run.replications;
  } catch {
    // a deliberately bad scenario: the worker must fail it cleanly
  }
  const seed = Number((scenario as { run?: { seed?: number } }).run?.seed ?? 0);
  const [row] = await db
    .insert(runs)
    .values({ workspaceId: owner.workspaceId, scenario: scenario as Record<string, unknown>, seed, plan, replicationsPlanned: replications, submittedBy: owner.userId })
    .returning({ id: runs.id });
  await sendJob(boss, queues.runStart, { runId: row.id });
  return row.id;
}

export async function submitTestSweep(db: Database, boss: PgBoss, owner: { workspaceId: string; userId: string }, scenario: ScenarioInput, definition: Record<string, unknown>): Promise<string> {
  const kind = (definition.kind as "sweep" | "grid" | "dimensioning" | undefined) ?? "sweep";
  const [row] = await db
    .insert(sweeps)
    .values({ workspaceId: owner.workspaceId, kind, scenario: scenario as Record<string, unknown>, definition, submittedBy: owner.userId })
    .returning({ id: sweeps.id });
  await sendJob(boss, queues.sweepStart, { sweepId: row.id });
  return row.id;
}

/** What the web's cancel does: status -> cancelled, then a run-finalise job. */
export async function cancelTestRun(db: Database, boss: PgBoss, runId: string): Promise<void> {
  await db.update(runs).set({ status: "cancelled", finishedAt: new Date() }).where(eq(runs.id, runId));
  await sendJob(boss, queues.runFinalise, { runId });
}

export async function readRun(db: Database, runId: string) {
  const [row] = await db.select().from(runs).where(eq(runs.id, runId));
  return row;
}

export async function readChunks(db: Database, runId: string) {
  return db.select().from(runChunks).where(eq(runChunks.runId, runId)).orderBy(runChunks.chunk);
}

/** Polls until `check` returns a value (not undefined/false) or the time is up. */
export async function waitFor<T>(what: string, check: () => Promise<T | undefined | false | null>, timeoutMs = 30_000, everyMs = 100): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined && value !== false && value !== null) return value;
    if (Date.now() > deadline) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

export async function waitForRunStatus(db: Database, runId: string, statuses: string[], timeoutMs = 30_000) {
  return waitFor(`run ${runId} to reach ${statuses.join(" or ")}`, async () => {
    const run = await readRun(db, runId);
    return statuses.includes(run.status) ? run : undefined;
  }, timeoutMs);
}

/** A worker as its own process (`node --import tsx worker/main.ts`), as `npm run worker` starts it. */
export function spawnWorker(databaseUrl: string, env: Record<string, string> = {}): { child: ChildProcess; output: () => string; ready: Promise<void> } {
  const child = spawn(process.execPath, ["--import", "tsx", "worker/main.ts"], {
    cwd: projectRoot,
    env: { ...process.env, DATABASE_URL: databaseUrl, NODE_ENV: "test", SPILLWAY_WORKER_THREADS: "1", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let text = "";
  const ready = new Promise<void>((resolve, reject) => {
    const onData = (chunk: Buffer) => {
      text += chunk.toString();
      if (text.includes("ready")) resolve();
    };
    child.stdout!.on("data", onData);
    child.stderr!.on("data", onData);
    child.once("exit", (code) => reject(new Error(`worker exited with ${code} before it was ready:\n${text}`)));
  });
  return { child, output: () => text, ready };
}

export function stopChild(child: ChildProcess, signal: NodeJS.Signals = "SIGTERM"): Promise<void> {
  return new Promise((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once("exit", () => resolve());
    child.kill(signal);
  });
}

/** JSON with object keys sorted at every level: PostgreSQL's jsonb keeps values exactly but not key order. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_key, v) =>
    v && typeof v === "object" && !Array.isArray(v) ? Object.fromEntries(Object.entries(v).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))) : v,
  );
}
