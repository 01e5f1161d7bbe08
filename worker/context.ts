// What every handler gets: the database, the queue client, the process's thread pool, a log.
import type PgBoss from "pg-boss";
import type { Database } from "../db/client";
import type { ReplicationRunner } from "../lib/simulation/node";

export interface WorkerContext {
  db: Database;
  boss: PgBoss;
  /** One replication pool per process, shared by every chunk this process runs. */
  runner: ReplicationRunner;
  /** Names this process in run_chunks.worker (host:pid). */
  name: string;
  /** Chunks queued beyond a precision run's finished prefix (speed only, never the result). */
  lookahead: number;
  log: (line: string) => void;
  /** Chunks running in this process, so shutdown can release them. */
  running: Set<AbortController>;
  /** Wakes this process's idle chunk pollers after chunk jobs were sent (pg-boss polls otherwise). */
  wakeChunkWorkers: () => void;
}

/** Why a chunk stopped early: its run ended (cancel), the process is stopping, or its time ran out. */
export class ChunkStopped extends Error {
  constructor(readonly reason: "run-ended" | "released" | "time-limit", message: string) {
    super(message);
    this.name = "ChunkStopped";
  }
}
