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

describe("stale lock files", () => {
  it("removes lock files whose PID is not a running PostgreSQL process", async () => {
    const { removeStaleLockFiles } = await import("@/db/postgres");
    const { mkdirSync, writeFileSync, existsSync } = await import("node:fs");
    const config: EmbeddedPostgresConfig = {
      dataDir: path.join(scratchRoot, "stale-data"),
      socketDir: path.join(scratchRoot, "stale-socket"),
      port: 1,
      database: "unused",
      user: "unused",
      password: "unused",
    };
    mkdirSync(config.dataDir, { recursive: true });
    mkdirSync(config.socketDir, { recursive: true });
    // This test process is alive but is not postgres: exactly the reused-PID case after a crash.
    writeFileSync(path.join(config.dataDir, "postmaster.pid"), `${process.pid}\n${config.dataDir}\n`);
    writeFileSync(path.join(config.socketDir, ".s.PGSQL.1.lock"), `999999999\n`);
    expect(removeStaleLockFiles(config)).toHaveLength(2);
    expect(existsSync(path.join(config.dataDir, "postmaster.pid"))).toBe(false);
  });
});
