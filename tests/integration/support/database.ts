import { randomBytes } from "node:crypto";
import { Client } from "pg";
import { createDatabase, type Database } from "@/db/client";
import { runMigrations } from "@/db/migrate";

/** A throw-away database on the test server, so each file starts from nothing. */
export async function createScratchDatabase(): Promise<{ url: string; drop: () => Promise<void> }> {
  const base = process.env.DATABASE_URL;
  if (!base) throw new Error("DATABASE_URL is not set; run the integration tests through `npm test`.");
  const name = `spillway_scratch_${randomBytes(6).toString("hex")}`;
  const admin = new Client({ connectionString: base });
  await admin.connect();
  await admin.query(`CREATE DATABASE "${name}"`);
  await admin.end();
  const url = new URL(base);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    drop: async () => {
      const client = new Client({ connectionString: base });
      await client.connect();
      try {
        // Why the retry: on PostgreSQL 15, WITH (FORCE) run by a non-superuser refuses to terminate an
        // autovacuum worker that happens to be vacuuming the scratch database ("must be a member of the role
        // whose process is being terminated", SQLSTATE 42501); the worker is done within moments.
        for (let attempt = 1; ; attempt++) {
          try {
            await client.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
            break;
          } catch (error) {
            if ((error as { code?: string }).code !== "42501" || attempt >= 10) throw error;
            await new Promise((resolve) => setTimeout(resolve, 200 * attempt));
          }
        }
      } finally {
        await client.end();
      }
    },
  };
}

export async function migratedScratchDatabase(): Promise<{ db: Database; url: string; close: () => Promise<void> }> {
  const scratch = await createScratchDatabase();
  await runMigrations(scratch.url);
  const { db, pool } = createDatabase(scratch.url, 4);
  return {
    db,
    url: scratch.url,
    close: async () => {
      await pool.end();
      await scratch.drop();
    },
  };
}
