import { afterEach, describe, expect, it } from "vitest";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { execFileSync } from "node:child_process";
import os from "node:os";
import path from "node:path";
import { ensureAuthSecret, loadEnvFile } from "@/lib/ops/environment";

const saved = { ...process.env };
afterEach(() => {
  process.env = { ...saved };
});

describe("AUTH_SECRET on first start", () => {
  it("is generated into the env file once, then read back", () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "spillway-env-")), ".env.local");
    delete process.env.AUTH_SECRET;
    const lines: string[] = [];
    const secret = ensureAuthSecret((l) => lines.push(l), file);
    expect(secret).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(readFileSync(file, "utf8")).toContain(`AUTH_SECRET=${secret}`);
    expect(lines.join()).toContain("Generated AUTH_SECRET");

    delete process.env.AUTH_SECRET;
    loadEnvFile(file);
    expect(process.env.AUTH_SECRET).toBe(secret);
    expect(ensureAuthSecret(() => {}, file)).toBe(secret);
    expect(readFileSync(file, "utf8").match(/AUTH_SECRET=/g)).toHaveLength(1);
  });

  it("never overrides what the environment already says", () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "spillway-env-")), ".env.local");
    writeFileSync(file, "# comment\nAUTH_SECRET=from-file\nSMTP_URL='smtp://mail.example.test:587'\n");
    process.env.AUTH_SECRET = "from-env";
    delete process.env.SMTP_URL;
    loadEnvFile(file);
    expect(process.env.AUTH_SECRET).toBe("from-env");
    expect(process.env.SMTP_URL).toBe("smtp://mail.example.test:587");
  });

  it("keeps the env file out of version control", () => {
    const root = path.resolve(__dirname, "../../..");
    expect(execFileSync("git", ["check-ignore", ".env.local"], { cwd: root, encoding: "utf8" }).trim()).toBe(".env.local");
  });
});
