// Idempotent demo seed: upserts the demo workspaces, users and memberships; never touches other data.
import { and, eq, sql } from "drizzle-orm";
import { createDatabase, type Database } from "./client";
import { demoAccounts, demoWorkspaces } from "./demo-data";
import { memberships, users, workspaces } from "./schema";
import { hashPassword, verifyPassword } from "../lib/secrets/password";
import { seedDemoLab } from "./demo-lab";
import { seedDemoTraffic } from "./demo-traffic";
import { databaseUrl } from "../lib/config";

export async function seedDemo(db: Database, log: (line: string) => void = () => {}): Promise<void> {
  await seedAccounts(db);
  await seedDemoLab(db, log);
  await seedDemoTraffic(db, log);
}

async function seedAccounts(db: Database): Promise<void> {
  await db.transaction(async (tx) => {
    const workspaceIds = new Map<string, string>();
    for (const workspace of demoWorkspaces) {
      const [row] = await tx
        .insert(workspaces)
        .values(workspace)
        .onConflictDoUpdate({
          target: workspaces.slug,
          set: { name: workspace.name, description: workspace.description, safetyCritical: workspace.safetyCritical },
        })
        .returning({ id: workspaces.id });
      workspaceIds.set(workspace.slug, row.id);
    }
    for (const account of demoAccounts) {
      const [existing] = await tx.select().from(users).where(sql`lower(${users.email}) = ${account.email}`);
      let userId = existing?.id;
      if (!existing) {
        const [created] = await tx
          .insert(users)
          .values({ email: account.email, name: account.name, passwordHash: await hashPassword(account.password), emailVerified: new Date() })
          .returning({ id: users.id });
        userId = created.id;
      } else if (!existing.passwordHash || !(await verifyPassword(account.password, existing.passwordHash))) {
        // Keeps the printed demo passwords true after someone changed one.
        await tx.update(users).set({ passwordHash: await hashPassword(account.password) }).where(eq(users.id, existing.id));
      }
      for (const [slug, role] of Object.entries(account.roles)) {
        const workspaceId = workspaceIds.get(slug)!;
        if (!role) {
          await tx.delete(memberships).where(and(eq(memberships.userId, userId!), eq(memberships.workspaceId, workspaceId)));
          continue;
        }
        await tx
          .insert(memberships)
          .values({ userId: userId!, workspaceId, role })
          .onConflictDoUpdate({ target: [memberships.userId, memberships.workspaceId], set: { role } });
      }
    }
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const { db, pool } = createDatabase(databaseUrl(), 2);
  seedDemo(db, console.log)
    .then(() => console.log("Demo workspace seeded."))
    .catch((error) => {
      console.error(`seed: ${error.message}`);
      process.exitCode = 1;
    })
    .finally(() => pool.end());
}
