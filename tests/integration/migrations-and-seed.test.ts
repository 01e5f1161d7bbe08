import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Client } from "pg";
import { readdirSync } from "node:fs";
import { createDatabase } from "@/db/client";
import { migrationsFolder, runMigrations } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import { demoAccounts, demoWorkspaces } from "@/db/demo-data";
import { verifyPassword } from "@/lib/secrets/password";
import { createScratchDatabase } from "./support/database";

let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
beforeAll(async () => {
  scratch = await createScratchDatabase();
});
afterAll(async () => scratch.drop());

async function query<T = Record<string, unknown>>(sql: string): Promise<T[]> {
  const client = new Client({ connectionString: scratch.url });
  await client.connect();
  try {
    return (await client.query(sql)).rows as T[];
  } finally {
    await client.end();
  }
}

describe("migrations", () => {
  it("apply on an empty database", async () => {
    await runMigrations(scratch.url);
    const tables = (await query<{ table_name: string }>("select table_name from information_schema.tables where table_schema = 'public'")).map((r) => r.table_name);
    for (const t of ["users", "accounts", "sessions", "verification_tokens", "workspaces", "memberships", "invitations", "audit_events", "sign_in_attempts", "captured_mail", "worker_heartbeats"]) {
      expect(tables).toContain(t);
    }
    const applied = await query("select * from drizzle.__drizzle_migrations");
    expect(applied).toHaveLength(readdirSync(migrationsFolder).filter((f) => f.endsWith(".sql")).length);
  });

  it("are a no-op the second time", async () => {
    const before = await query("select hash, created_at from drizzle.__drizzle_migrations order by id");
    await runMigrations(scratch.url);
    expect(await query("select hash, created_at from drizzle.__drizzle_migrations order by id")).toEqual(before);
  });
});

describe("demo seed", () => {
  it("is idempotent and keeps the printed passwords true", async () => {
    const { db, pool } = createDatabase(scratch.url, 2);
    try {
      await seedDemo(db);
      const snapshot = async () => ({
        users: await query("select id, email from users order by email"),
        workspaces: await query("select id, slug from workspaces order by slug"),
        memberships: await query("select user_id, workspace_id, role from memberships order by user_id, workspace_id"),
      });
      const first = await snapshot();
      expect(first.users).toHaveLength(demoAccounts.length);
      expect(first.workspaces).toHaveLength(demoWorkspaces.length);
      // Someone changes a demo password; the next seed puts it back and duplicates nothing.
      await query(`update users set password_hash = 'x' where email = '${demoAccounts[0].email}'`);
      await seedDemo(db);
      expect(await snapshot()).toEqual(first);
      const [row] = await query<{ password_hash: string }>(`select password_hash from users where email = '${demoAccounts[0].email}'`);
      expect(await verifyPassword(demoAccounts[0].password, row.password_hash)).toBe(true);
      const roles = await query<{ email: string; slug: string; role: string }>(
        "select u.email, w.slug, m.role from memberships m join users u on u.id = m.user_id join workspaces w on w.id = m.workspace_id",
      );
      for (const a of demoAccounts) {
        for (const [slug, role] of Object.entries(a.roles)) {
          const found = roles.find((r) => r.email === a.email && r.slug === slug);
          expect(found?.role ?? null).toBe(role);
        }
      }
    } finally {
      await pool.end();
    }
  });
});
