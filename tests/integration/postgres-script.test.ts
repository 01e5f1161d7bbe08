import { afterAll, describe, expect, it } from "vitest";
import net from "node:net";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { PostgresSetupError, startEmbeddedPostgres, type EmbeddedPostgresConfig } from "@/db/postgres";

const scratchRoot = mkdtempSync(path.join(os.tmpdir(), "spillway-pg-"));
afterAll(() => rmSync(scratchRoot, { recursive: true, force: true }));

describe("embedded PostgreSQL script", () => {
  it("stops with a clear message and status 3 when its port is taken", async () => {
    const blocker = net.createServer();
    await new Promise<void>((resolve) => blocker.listen(0, "127.0.0.1", () => resolve()));
    const port = (blocker.address() as net.AddressInfo).port;
    const config: EmbeddedPostgresConfig = {
      dataDir: path.join(scratchRoot, "data"),
      socketDir: path.join(scratchRoot, "socket"),
      port,
      database: "unused",
      user: "unused",
      password: "unused",
    };
    try {
      const error = await startEmbeddedPostgres(config, () => {}).catch((e) => e);
      expect(error).toBeInstanceOf(PostgresSetupError);
      expect(error.exitCode).toBe(3);
      expect(error.message).toContain(`port ${port}`);
      expect(error.message).toContain("SPILLWAY_PG_PORT");
    } finally {
      blocker.close();
    }
  });
});
