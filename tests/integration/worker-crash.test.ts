// Worker processes dying and stopping: `kill -9` mid-run loses nothing and counts nothing twice;
// SIGTERM releases a running chunk to another worker. Workers are real child processes
// (`node --import tsx worker/main.ts`, as `npm run worker` starts them), one thread each.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { ChildProcess } from "node:child_process";
import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { createBoss } from "@/db/queue";
import type { PartialAggregate } from "@/lib/simulation";
import { parseScenario, runScenario, type ScenarioInput } from "@/lib/simulation/node";
import { restartDelayMs, Supervisor } from "@/lib/ops/processes";
import { migratedScratchDatabase } from "./support/database";
import { canonicalJson, createWorkspace, readChunks, spawnWorker, stopChild, submitTestRun, waitFor, waitForRunStatus } from "./support/worker";

let scratch: Awaited<ReturnType<typeof migratedScratchDatabase>>;
let db: Database;
let boss: PgBoss;
let owner: Awaited<ReturnType<typeof createWorkspace>>;
const children: ChildProcess[] = [];

beforeAll(async () => {
  scratch = await migratedScratchDatabase();
  db = scratch.db;
  boss = await createBoss(scratch.url, "web");
  owner = await createWorkspace(db, "spill");
});

afterAll(async () => {
  await Promise.all(children.map((c) => stopChild(c, "SIGKILL")));
  await boss?.stop({ graceful: false, wait: true });
  await scratch?.close();
});

async function startWorkers(count: number, env: Record<string, string> = {}) {
  const started = Array.from({ length: count }, () => spawnWorker(scratch.url, env));
  children.push(...started.map((w) => w.child));
  await Promise.all(started.map((w) => w.ready));
  return started;
}

/** 10 chunks of 2 replications x 300 000 calls: a few seconds of work for two one-thread workers. */
const scenario = (seed: number): ScenarioInput => ({
  servers: 12,
  arrivals: { process: "poisson", rate: 9 },
  holding: { law: "exponential", mean: 1 },
  run: { seed, replications: 20, callsPerReplication: 300_000, chunkReplications: 2 },
});

/** Every chunk holds exactly its own replications, once, and together they cover the run. */
async function expectEachReplicationOnce(runId: string, replications: number) {
  const chunks = await readChunks(db, runId);
  const indices = chunks.flatMap((c) => {
    const aggregate = c.aggregate as unknown as PartialAggregate;
    expect(aggregate.firstReplication).toBe(c.firstReplication);
    expect(aggregate.records).toHaveLength(c.replications);
    return aggregate.records.map((r) => r.index);
  });
  expect(indices).toEqual(Array.from({ length: replications }, (_, i) => i));
  return chunks;
}

describe("worker processes", () => {
  it("kill -9 of one of two workers mid-run: another picks its chunk up; result equals the single-process CLI run", async () => {
    const [a, b] = await startWorkers(2);
    const runId = await submitTestRun(db, boss, owner, scenario(21));
    const victim = `:${a.child.pid}`;
    // Wait until the victim holds a chunk it has not finished, then kill it without warning.
    const held = await waitFor("a chunk running on worker A", async () => (await readChunks(db, runId)).find((c) => c.worker?.endsWith(victim) && !c.aggregate), 30_000, 10);
    a.child.kill("SIGKILL");
    // pg-boss expires the dead worker's job after the chunk's time limit (about 16 s here) and retries it.
    const run = await waitForRunStatus(db, runId, ["succeeded", "failed"], 45_000);
    expect(run.status).toBe("succeeded");
    const chunks = await expectEachReplicationOnce(runId, 20);
    const recovered = chunks.find((c) => c.chunk === held.chunk)!;
    expect(recovered.attempts).toBe(2);
    expect(recovered.worker).toMatch(new RegExp(`:${b.child.pid}$`));
    expect(canonicalJson(run.result)).toBe(canonicalJson(await runScenario(parseScenario(scenario(21)), { threads: 1 })));
    await stopChild(b.child);
  }, 80_000);

  it("SIGTERM releases a running chunk to the other worker and exits cleanly", async () => {
    // No grace: the running chunk is handed back at once, however fast the engine gets through it.
    const [c] = await startWorkers(1, { SPILLWAY_WORKER_GRACE_SECONDS: "0" });
    // Two chunks of 2 x 2 000 000 calls with lognormal holding (the general event loop).
    const runId = await submitTestRun(db, boss, owner, { ...scenario(22), holding: { law: "lognormal", mean: 1, cv: 1.5 }, run: { ...scenario(22).run, replications: 4, callsPerReplication: 2_000_000 } });
    const held = await waitFor("a chunk running on worker C", async () => (await readChunks(db, runId)).find((ch) => ch.worker?.endsWith(`:${c.child.pid}`) && !ch.aggregate), 30_000, 10);
    const exit = new Promise<number | null>((resolve) => c.child.once("exit", (code) => resolve(code)));
    c.child.kill("SIGTERM");
    expect(await exit).toBe(0);
    expect(c.output(), c.output()).toMatch(/releasing [12] running chunk/);
    // Only now another worker joins: it finds the released chunks back in the queue.
    const [d] = await startWorkers(1);
    const run = await waitForRunStatus(db, runId, ["succeeded", "failed"], 60_000);
    expect(run.status).toBe("succeeded");
    const chunks = await expectEachReplicationOnce(runId, 4);
    const released = chunks.find((ch) => ch.chunk === held.chunk)!;
    expect(released.attempts).toBe(2);
    expect(released.worker).toMatch(new RegExp(`:${d.child.pid}$`));
    await stopChild(d.child);
  }, 90_000);

  it("the supervisor restarts a dying worker with backoff while the other processes keep running", async () => {
    const supervisor = new Supervisor();
    const restarts: { code: number | null; delayMs: number }[] = [];
    const unexpected: string[] = [];
    supervisor.onRestart = (_name, code, delayMs) => restarts.push({ code, delayMs });
    supervisor.onUnexpectedExit = (name) => unexpected.push(name);
    try {
      const web = supervisor.start("web", ["-e", "setInterval(() => {}, 1000)"], process.env, { quiet: true });
      supervisor.start("worker-1", ["-e", "process.exit(3)"], process.env, { quiet: true, restart: true });
      await waitFor("two restarts", async () => restarts.length >= 2, 10_000);
      expect(restarts.slice(0, 2)).toEqual([
        { code: 3, delayMs: 1000 },
        { code: 3, delayMs: 2000 },
      ]);
      expect(unexpected).toEqual([]);
      expect(web.child.exitCode).toBeNull();
      expect(restartDelayMs(10)).toBe(30_000); // capped
    } finally {
      await supervisor.stopAll(2000);
    }
  });
});
