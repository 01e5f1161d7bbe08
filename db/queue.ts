// The one pg-boss client: the web sends jobs, the worker works them, health asks pg-boss about them.
// Options checked against pg-boss 10.4.2 (node_modules/pg-boss/src/attorney.js, plans.js, manager.js).
import PgBoss from "pg-boss";
import { allQueueNames, queues, type Payload, type QueueName } from "../lib/jobs/contracts";
import { databaseUrl } from "../lib/config";
import type { Database } from "./client";

export type QueueRole = "web" | "worker";

/**
 * Per-queue retry and expiry (pg-boss stores them on the queue row; a send may override them).
 * - Retries: retryDelay 1 s with retryBackoff doubles a jittered delay each attempt
 *   (delay·2^min(16, n+1)/2·(1+U), plans.js failJobs), so 4 retries wait at most 2+4+8+16 s.
 * - Expiry: a job still `active` after expireInSeconds is failed by maintenance and retried; that
 *   is how a chunk of a worker killed with kill -9 comes back. Chunk jobs set their own expiry
 *   from the chunk plan (worker/chunk-time.ts); the queue value is the fallback.
 * - deadLetter: a chunk that used up its retries (thrown, or its workers kept dying) is copied to
 *   run-chunk-failed, whose handler fails the run with the reason instead of leaving it running.
 */
const queueOptions: Record<QueueName, Omit<PgBoss.Queue, "name">> = {
  [queues.runStart]: { retryLimit: 3, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 },
  [queues.runChunk]: { retryLimit: 4, retryDelay: 1, retryBackoff: true, expireInSeconds: 60, deadLetter: queues.runChunkFailed },
  [queues.runChunkFailed]: { retryLimit: 3, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 },
  [queues.runFinalise]: { retryLimit: 3, retryDelay: 1, retryBackoff: true, expireInSeconds: 120 },
  [queues.sweepStart]: { retryLimit: 3, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 },
  [queues.sweepAdvance]: { retryLimit: 3, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 },
  [queues.notify]: { retryLimit: 5, retryDelay: 5, retryBackoff: true, expireInSeconds: 60 },
  // A 20 MB file takes tens of seconds to characterise; a worker killed meanwhile is noticed after 10 minutes.
  [queues.characteriseUpload]: { retryLimit: 2, retryDelay: 5, retryBackoff: true, expireInSeconds: 600 },
};

/**
 * Maintenance (expiring dead workers' jobs, archiving) runs in worker processes only, every
 * 2 s; pg-boss lets one instance per interval do it (trySetMaintenanceTime), so more workers add
 * no load. The web process only sends: no supervision, no cron clock.
 */
const roleOptions: Record<QueueRole, Partial<PgBoss.ConstructorOptions>> = {
  web: { supervise: false, schedule: false, max: 2 },
  worker: { supervise: true, maintenanceIntervalSeconds: 2, schedule: false, max: 4 },
};

/**
 * Creates the queues (required before send or work, else sends return null) and brings their
 * options up to date (createQueue leaves an existing queue as it is). Dead-letter targets first.
 */
export async function createQueues(boss: PgBoss): Promise<void> {
  const ordered = [...allQueueNames].sort((a, b) => Number(Boolean(queueOptions[a].deadLetter)) - Number(Boolean(queueOptions[b].deadLetter)));
  for (const name of ordered) {
    await boss.createQueue(name, { name, ...queueOptions[name] });
    await boss.updateQueue(name, { name, ...queueOptions[name] });
  }
}

export async function createBoss(url: string, role: QueueRole): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString: url, application_name: `spillway-${role}`, ...roleOptions[role] });
  await boss.start();
  await createQueues(boss);
  return boss;
}

const globalForBoss = globalThis as unknown as { spillwayBoss?: Promise<PgBoss> };

/** The web process's send-only client for DATABASE_URL (survives Next's module reloads). */
export function getBoss(): Promise<PgBoss> {
  if (!globalForBoss.spillwayBoss) {
    const starting = createBoss(databaseUrl(), "web");
    starting.then((boss) => boss.on("error", (error) => console.error(`pg-boss: ${error.message}`))).catch(() => {});
    // A failed start is not cached: the next request tries again.
    starting.catch(() => {
      if (globalForBoss.spillwayBoss === starting) globalForBoss.spillwayBoss = undefined;
    });
    globalForBoss.spillwayBoss = starting;
  }
  return globalForBoss.spillwayBoss;
}

export async function closeBoss(): Promise<void> {
  const current = globalForBoss.spillwayBoss;
  globalForBoss.spillwayBoss = undefined;
  const boss = await current?.catch(() => undefined);
  await boss?.stop({ graceful: false, wait: true });
}

/** Sends a job; a null id (queue missing, or a singleton already queued) is an error, never a silent loss. */
export async function sendJob<Q extends QueueName>(boss: PgBoss, queue: Q, payload: Payload<Q>, options: PgBoss.SendOptions = {}): Promise<string> {
  const id = await boss.send(queue, payload as object, options);
  if (!id) throw new Error(`pg-boss did not accept the ${queue} job`);
  return id;
}

/**
 * pg-boss's `db` option for a drizzle transaction, so jobs are inserted in the same transaction as
 * the rows they act on (both commit or neither: no chunk row without its job, no job without its row).
 */
export function jobsIn(tx: Pick<Database, "execute">): PgBoss.Db {
  // drizzle keeps the transaction's pg client on its session; pg-boss needs text + values.
  const client = (tx as unknown as { session: { client: { query(text: string, values?: unknown[]): Promise<{ rows: unknown[] }> } } }).session.client;
  return { executeSql: async (text, values) => ({ rows: (await client.query(text, values)).rows }) };
}

export interface QueueHealth {
  ok: boolean;
  queues: { name: QueueName; created: boolean; queued: number; active: number }[];
  error?: string;
}

/** The queues as pg-boss reports them (getQueues, getQueueSize), for the health route. */
export async function queueHealth(boss: PgBoss): Promise<QueueHealth> {
  const present = new Set((await boss.getQueues()).map((q) => q.name));
  const rows = await Promise.all(
    allQueueNames.map(async (name) => {
      if (!present.has(name)) return { name, created: false, queued: 0, active: 0 };
      // getQueueSize counts jobs in states before `before` (created and retry by default).
      const [queued, upToActive] = await Promise.all([boss.getQueueSize(name), boss.getQueueSize(name, { before: "completed" })]);
      return { name, created: true, queued, active: upToActive - queued };
    }),
  );
  const missing = rows.filter((r) => !r.created).map((r) => r.name);
  return { ok: missing.length === 0, queues: rows, ...(missing.length ? { error: `queues not created yet: ${missing.join(", ")}` } : {}) };
}
