// The worker's heartbeat: one row in worker_heartbeats, written at start and every HEARTBEAT_INTERVAL_SECONDS,
// deleted on a clean stop. A failed write is logged and tried again at the next tick; it never throws into the
// worker, so no job is lost over it (a worker that cannot write for the whole window only looks gone).
import type { Database } from "../db/client";
import { heartbeatFailure, pruneDeadWorkers, recordWorkerHeartbeat, removeWorkerHeartbeat, type WorkerIdentity } from "../db/queries/workers";
import { HEARTBEAT_INTERVAL_SECONDS, PRUNE_EVERY_BEATS } from "../lib/jobs/worker-heartbeat";

export interface Heartbeat {
  /** Stops the timer, waits for a write in flight, and deletes the row (a failure is logged, not thrown). */
  stop(): Promise<void>;
}

export async function startHeartbeat(db: Database, worker: WorkerIdentity, log: (line: string) => void, intervalMs = HEARTBEAT_INTERVAL_SECONDS * 1000): Promise<Heartbeat> {
  let beats = 0;
  let failing = false;
  let inFlight: Promise<void> | undefined;
  let stopped = false;

  const beat = (starting: boolean): Promise<void> =>
    (inFlight = (async () => {
      try {
        await recordWorkerHeartbeat(db, worker, { starting });
        if (beats++ % PRUNE_EVERY_BEATS === 0) await pruneDeadWorkers(db);
        if (failing) log(`worker ${worker.name}: heartbeat written again`);
        failing = false;
      } catch (error) {
        // Logged once per outage, not every few seconds.
        if (!failing) log(`worker ${worker.name}: heartbeat not written (${heartbeatFailure(error)}); trying again every ${intervalMs / 1000} s`);
        failing = true;
      } finally {
        inFlight = undefined;
      }
    })());

  await beat(true);
  // unref: the heartbeat alone never keeps the process alive. A tick is skipped while the last write is pending.
  const timer = setInterval(() => {
    if (!stopped && !inFlight) void beat(false);
  }, intervalMs);
  timer.unref();

  return {
    async stop() {
      if (stopped) return;
      stopped = true;
      clearInterval(timer);
      // A write still pending would otherwise put the row back after the delete.
      await inFlight;
      try {
        await removeWorkerHeartbeat(db, worker.name);
      } catch (error) {
        log(`worker ${worker.name}: heartbeat row not removed (${heartbeatFailure(error)}); it ages out of the liveness window`);
      }
    },
  };
}
