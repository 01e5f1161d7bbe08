import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import * as schema from "./schema";
import { databaseUrl } from "../lib/config";

export type Database = NodePgDatabase<typeof schema>;

export function createDatabase(url: string, max = 10): { db: Database; pool: Pool } {
  const pool = new Pool({ connectionString: url, max, idleTimeoutMillis: 30_000 });
  return { db: drizzle(pool, { schema }), pool };
}

const globalForDb = globalThis as unknown as { spillwayDb?: { db: Database; pool: Pool } };

/** The process-wide connection pool for DATABASE_URL (survives Next's module reloads). */
export function getDatabase(): Database {
  if (!globalForDb.spillwayDb) {
    globalForDb.spillwayDb = createDatabase(databaseUrl());
  }
  return globalForDb.spillwayDb.db;
}

export async function closeDatabase(): Promise<void> {
  const current = globalForDb.spillwayDb;
  globalForDb.spillwayDb = undefined;
  await current?.pool.end();
}
