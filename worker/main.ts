// The background worker: pg-boss on the same PostgreSQL; handlers from worker/handlers/index.ts.
// Run more of them (on this or other machines, against the same DATABASE_URL) for more capacity.
import { writeSync } from "node:fs";
import { availableParallelism, hostname } from "node:os";
import type PgBoss from "pg-boss";
import { allQueueNames, parsePayload, queues, type QueueName } from "../lib/jobs/contracts";
import { createReplicationRunner } from "../lib/simulation/node";
import { createDatabase } from "../db/client";
import { createBoss } from "../db/queue";
import { databaseUrl, workerConfig } from "../lib/config";
import { ChunkStopped, type WorkerContext } from "./context";
import { startHeartbeat } from "./heartbeat";
import { closeMeasurementPool } from "./measurement-pool";
import { handlers, type HandlerEntry } from "./handlers";

export interface WorkerOptions {
  /** Replication threads of this process (default SPILLWAY_WORKER_THREADS, else one per core). */
  threads?: number;
  log?: (line: string) => void;
}

export interface RunningWorker {
  context: WorkerContext;
  boss: PgBoss;
  /**
   * Stops taking jobs, lets running chunks finish for up to `graceMs`, then releases the rest to
   * the queue (pg-boss retries them on another worker) and closes everything.
   */
  stop(graceMs?: number): Promise<void>;
}

/** Workers started in this process so far: a second one (tests) gets its own name, so each keeps its own heartbeat row. */
let startedInProcess = 0;

export async function startWorker(databaseUrl: string, options: WorkerOptions = {}): Promise<RunningWorker> {
  const log = options.log ?? ((line: string) => console.log(line));
  const threads = options.threads ?? workerConfig.threads(availableParallelism());
  const lookahead = workerConfig.chunkLookahead();
  const { db, pool } = createDatabase(databaseUrl, threads + 4);
  const boss = await createBoss(databaseUrl, "worker");
  boss.on("error", (error) => log(`pg-boss: ${error.message}`));
  const runner = createReplicationRunner(threads);
  const chunkWorkers: string[] = [];
  const instance = ++startedInProcess;
  const name = `${hostname()}:${process.pid}${instance > 1 ? `#${instance}` : ""}`;
  const context: WorkerContext = {
    db,
    boss,
    runner,
    name,
    lookahead,
    log,
    running: new Set(),
    wakeChunkWorkers: () => chunkWorkers.forEach((id) => boss.notifyWorker(id)),
  };

  const register = async <Q extends QueueName>(queue: Q, entry: HandlerEntry<Q>) => {
    const copies = entry.concurrency === "threads+1" ? threads + 1 : entry.concurrency;
    for (let i = 0; i < copies; i++) {
      let id: string | undefined;
      id = await boss.work<unknown>(queue, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: entry.pollingIntervalSeconds }, async ([job]) => {
        try {
          let payload;
          try {
            payload = parsePayload(queue, job.data);
          } catch (error) {
            // A malformed job never becomes valid by retrying it.
            log(`${queue}: job ${job.id} has a malformed payload, dropped (${(error as Error).message})`);
            return;
          }
          job.expireInSeconds = Number(job.expireInSeconds); // pg returns EXTRACT(epoch ...) as a numeric string
          await entry.handle(context, payload, job);
        } catch (error) {
          if (error instanceof ChunkStopped) log(`${queue}: job ${job.id} handed back (${error.message})`);
          else log(`${queue}: job ${job.id} failed (attempt ${job.retryCount + 1} of ${job.retryLimit + 1}): ${(error as Error).message}`);
          throw error;
        } finally {
          // Look for the next job at once instead of waiting out the polling interval.
          if (id) boss.notifyWorker(id);
        }
      });
      if (queue === queues.runChunk) chunkWorkers.push(id);
    }
  };
  for (const queue of allQueueNames) await register(queue, handlers[queue] as HandlerEntry<typeof queue>);
  // Written once the handlers are registered: from here on a queued run has someone to take it (health, run API).
  const heartbeat = await startHeartbeat(db, { name, host: hostname(), pid: process.pid, threads }, log);
  log(`worker ${context.name} ready: ${threads} replication thread${threads === 1 ? "" : "s"}; queues: ${allQueueNames.join(", ")}`);

  let stopping: Promise<void> | undefined;
  const stop = (graceMs = workerConfig.graceSeconds() * 1000) =>
    (stopping ??= (async () => {
      // First: a stopping worker takes no new jobs, so it no longer counts as alive for queued runs.
      await heartbeat.stop();
      for (const queue of allQueueNames) await boss.offWork(queue);
      const deadline = Date.now() + graceMs;
      while (context.running.size > 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
      if (context.running.size > 0) log(`releasing ${context.running.size} running chunk(s) to other workers`);
      for (const controller of context.running) controller.abort(new ChunkStopped("released", "the worker is stopping; the chunk goes back to the queue"));
      await new Promise<void>((resolve) => {
        // stop() can resolve before jobs finish; the 'stopped' event is the reliable signal.
        boss.once("stopped", () => resolve());
        boss.stop({ graceful: true, wait: true, timeout: 10_000 }).catch(() => resolve());
      });
      await runner.close();
      await closeMeasurementPool();
      await pool.end();
    })());
  return { context, boss, stop };
}

if (import.meta.url === `file://${process.argv[1]}`) {
  let url: string;
  try {
    url = databaseUrl();
  } catch (error) {
    console.error(`worker: ${(error as Error).message}`);
    process.exit(2);
  }
  // Synchronous writes: pipe output is otherwise lost when the process exits right after a line.
  const log = (line: string) => writeSync(1, `${line}\n`);
  // Another pg-boss client creating its schema or queues at the same moment can make PostgreSQL abort one of
  // them (deadlock 40P01, serialization failure 40001): that start is tried again rather than lost.
  const start = async (attempt = 1): Promise<RunningWorker> => {
    try {
      return await startWorker(url, { log });
    } catch (error) {
      const code = (error as { code?: string }).code;
      if (attempt >= 5 || (code !== "40P01" && code !== "40001")) throw error;
      log(`worker: start attempt ${attempt} failed (${(error as Error).message}); trying again`);
      await new Promise((r) => setTimeout(r, 500 * attempt));
      return start(attempt + 1);
    }
  };
  start().then(
    (worker) => {
      const stop = () => worker.stop().then(() => process.exit(0));
      process.once("SIGTERM", stop);
      process.once("SIGINT", stop);
    },
    (error) => {
      console.error(`worker: ${error.message}`);
      process.exit(1);
    },
  );
}
