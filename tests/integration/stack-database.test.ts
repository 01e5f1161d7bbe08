import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Client } from "pg";
import { prepareDatabase } from "@/lib/ops/stack";
import { demoAccounts } from "@/db/demo-data";
import { createScratchDatabase } from "./support/database";

let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
const savedUrl = process.env.TEST_DATABASE_URL;
beforeAll(async () => {
  scratch = await createScratchDatabase();
});
afterAll(async () => {
  if (savedUrl === undefined) delete process.env.TEST_DATABASE_URL;
  else process.env.TEST_DATABASE_URL = savedUrl;
  await scratch.drop();
});

describe("start-up against another server", () => {
  it("uses the given URL, migrates and seeds it, and starts no embedded PostgreSQL", async () => {
    process.env.TEST_DATABASE_URL = scratch.url;
    const lines: string[] = [];
    const { databaseUrl, stopDatabase } = await prepareDatabase({ profile: "test", webPort: 0, smtpPort: 0, freshDatabase: true, log: (l) => lines.push(l) });
    expect(databaseUrl).toBe(scratch.url);
    expect(lines.join("\n")).toContain("the embedded one is not started");
    expect(lines.join("\n")).not.toContain("Creating a PostgreSQL cluster");
    stopDatabase(); // a no-op for a server we did not start
    const client = new Client({ connectionString: scratch.url });
    await client.connect();
    const { rows } = await client.query("select count(*)::int as n from users");
    await client.end();
    expect(rows[0].n).toBe(demoAccounts.length);
  });
});
