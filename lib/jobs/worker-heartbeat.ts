// How often a worker says it is alive, and how long a silence means it is not. Pure and browser-safe: the worker
// (worker/heartbeat.ts), the liveness query (db/queries/workers.ts), health and the run API all read these.

/**
 * A worker writes its heartbeat row at start and then this often: one small upsert per process every 5 s is no
 * load, and leaves room for several beats inside the liveness window below.
 */
export const HEARTBEAT_INTERVAL_SECONDS = 5;

/**
 * A worker not seen for this long counts as gone. Six intervals, so a few slow or failed writes (a busy pool, a
 * brief network fault) or a moment when the worker's main thread is busy (a run's analytic references are
 * computed there) do not make a live worker look dead; a killed worker is noticed within 30 s.
 */
export const LIVENESS_WINDOW_SECONDS = 30;

/** Rows of workers silent this long are deleted, so killed workers do not pile up in the table. */
export const PRUNE_AFTER_SECONDS = 24 * 60 * 60;

/** Prune at start and then once every this many heartbeats (an hour at 5 s). */
export const PRUNE_EVERY_BEATS = 720;

/** What health and the run API say when no worker has reported within the window. */
export function noLiveWorkerMessage(windowSeconds = LIVENESS_WINDOW_SECONDS): string {
  return `No background worker has reported in the last ${windowSeconds} s: queued runs wait until one starts.`;
}
