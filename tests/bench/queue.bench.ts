// Runs through the queue: replications per second with 1 and with 2 worker processes (one
// replication thread each), queue overhead per chunk, and seconds from submit to first progress.
// Needs PostgreSQL (DATABASE_URL); works in a scratch database it drops afterwards.
import { availableParallelism, loadavg } from "node:os";
import type PgBoss from "pg-boss";
import { createDatabase, type Database } from "../../db/client";
import { runMigrations } from "../../db/migrate";
import { createBoss } from "../../db/queue";
import { parseScenario, planRun, runScenario, type ScenarioInput } from "../../lib/simulation/node";
import { createScratchDatabase } from "../integration/support/database";
import { createWorkspace, readRun, spawnWorker, stopChild, submitTestRun, waitFor } from "../integration/support/worker";

/**
 * 24 chunks of 2 replications x 1 000 000 calls with lognormal holding (the general loop, about 0.25 s of one
 * core per chunk): long enough that the 2-process ratio measures scaling rather than the queue's fixed cost per
 * chunk, which is reported on its own below.
 */
const scenario = (seed: number): ScenarioInput => ({
  servers: 30,
  arrivals: { process: "poisson", rate: 20 },
  holding: { law: "lognormal", mean: 1, cv: 1 },
  run: { seed, replications: 48, callsPerReplication: 1_000_000, chunkReplications: 2 },
});

async function timedRun(db: Database, boss: PgBoss, owner: { workspaceId: string; userId: string }, seed: number) {
  const t0 = performance.now();
  const runId = await submitTestRun(db, boss, owner, scenario(seed));
  let firstProgress = NaN;
  await waitFor("the bench run", async () => {
    const run = await readRun(db, runId);
    if (Number.isNaN(firstProgress) && run.progress > 0) firstProgress = (performance.now() - t0) / 1000;
    if (run.status === "failed") throw new Error(`bench run failed: ${run.error}`);
    return run.status === "succeeded";
  }, 300_000, 20);
  return { seconds: (performance.now() - t0) / 1000, firstProgress };
}

export async function runQueueBench(): Promise<void> {
  console.log(`\nqueue (pg-boss on PostgreSQL; worker processes with SPILLWAY_WORKER_THREADS=1; load average ${loadavg()[0].toFixed(1)} on ${availableParallelism()} cores: the 2-process ratio needs 2 idle cores)`);
  if (!process.env.DATABASE_URL) {
    console.log("  skipped: DATABASE_URL is not set (npm run db:start prints it)");
    return;
  }
  const scratch = await createScratchDatabase();
  await runMigrations(scratch.url);
  const { db, pool } = createDatabase(scratch.url, 4);
  const boss = await createBoss(scratch.url, "web");
  const owner = await createWorkspace(db, "bench");
  const s = parseScenario(scenario(1));
  const replications = s.run.replications;
  const chunks = Math.ceil(replications / planRun(s).chunkReplications);
  const workers: ReturnType<typeof spawnWorker>[] = [];
  try {
    // Reference in the same run: the same replications in this process, one thread, no queue.
    const t0 = performance.now();
    await runScenario(s, { threads: 1 });
    const local = (performance.now() - t0) / 1000;
    console.log(`  reference: runScenario in-process, 1 thread: ${(replications / local).toFixed(1)} replications/s (${local.toFixed(2)} s)`);

    const start = async (n: number) => {
      const started = Array.from({ length: n }, () => spawnWorker(scratch.url, { NODE_ENV: "production" }));
      workers.push(...started);
      await Promise.all(started.map((w) => w.ready));
    };
    await start(1);
    await timedRun(db, boss, owner, 100); // warm-up: first jobs, JIT
    const one = await timedRun(db, boss, owner, 2);
    await start(1);
    await timedRun(db, boss, owner, 101);
    const two = await timedRun(db, boss, owner, 3);
    const overheadMs = ((one.seconds - local) / chunks) * 1000;
    console.log(`  1 worker process : ${(replications / one.seconds).toFixed(1)} replications/s (${one.seconds.toFixed(2)} s for ${chunks} chunks)`);
    console.log(`  2 worker processes: ${(replications / two.seconds).toFixed(1)} replications/s (${two.seconds.toFixed(2)} s); ratio ${(one.seconds / two.seconds).toFixed(2)} (goal >= 1.8 on 2 free cores)`);
    console.log(`  queue overhead per chunk (1 worker vs in-process reference): ${overheadMs.toFixed(1)} ms`);
    console.log(`  submit to first progress: ${one.firstProgress.toFixed(2)} s (1 worker), ${two.firstProgress.toFixed(2)} s (2 workers)`);
  } finally {
    await Promise.all(workers.map((w) => stopChild(w.child)));
    await boss.stop({ graceful: false, wait: true });
    await pool.end();
    await scratch.drop();
  }
}
