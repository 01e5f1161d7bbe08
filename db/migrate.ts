// Applies the committed SQL in drizzle/ with drizzle-orm's migrator (drizzle-kit migrate can exit 0 on failure).
import path from "node:path";
import { fileURLToPath } from "node:url";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { createDatabase } from "./client";
import { databaseUrl } from "../lib/config";

export const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../drizzle");

export async function runMigrations(url: string): Promise<void> {
  const { db, pool } = createDatabase(url, 1);
  try {
    await migrate(db, { migrationsFolder });
  } finally {
    await pool.end();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  let url: string;
  try {
    url = databaseUrl();
  } catch (error) {
    console.error(`migrate: ${(error as Error).message}`);
    process.exit(2);
  }
  runMigrations(url)
    .then(() => console.log("Migrations applied."))
    .catch((error) => {
      console.error(`migrate: ${error.message}`);
      process.exitCode = 1;
    });
}
