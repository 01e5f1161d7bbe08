// `npm test`: its own database, then vitest (unit + integration), a production build and Playwright in Chromium.
import { spawn, spawnSync } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { projectRoot } from "./environment";
import { StackError, prepareDatabase, stackEnvironment, startStack, type StackOptions } from "./stack";
import { bundleWorkers } from "./bundle";

const log = (line: string) => console.log(`[test] ${line}`);
const outputDir = path.join(projectRoot, "tests/.output");

interface SuiteCount {
  suite: string;
  passed: number;
  failed: number;
  skipped: number;
}

function ensureChromium() {
  const chromium = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
  if (existsSync(chromium)) return;
  log("Installing Debian's chromium for the browser tests ...");
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  spawnSync("apt-get", ["update", "-qq"], { stdio: "inherit", env });
  const result = spawnSync("apt-get", ["install", "-y", "-qq", "chromium"], { stdio: "inherit", env });
  if (result.status !== 0 || !existsSync(chromium)) throw new StackError("could not install chromium with apt-get.");
}

function readJson(file: string): any {
  try {
    return JSON.parse(readFileSync(file, "utf8"));
  } catch {
    return null;
  }
}

function runVitest(env: NodeJS.ProcessEnv): SuiteCount {
  const report = path.join(outputDir, "vitest.json");
  const result = spawnSync(
    process.execPath,
    [path.join(projectRoot, "node_modules/vitest/vitest.mjs"), "run", "--config", "tests/vitest.config.mts", "--reporter=default", "--reporter=json", `--outputFile.json=${report}`],
    { cwd: projectRoot, env, stdio: "inherit" },
  );
  const json = readJson(report);
  if (!json) return { suite: "vitest", passed: 0, failed: 1, skipped: 0 };
  // A file that fails to load counts as a failure even when it ran no test.
  const brokenFiles = (json.testResults ?? []).filter((f: any) => f.status === "failed" && (f.assertionResults ?? []).length === 0).length;
  const failed = json.numFailedTests + brokenFiles + (result.status !== 0 && json.numFailedTests === 0 && brokenFiles === 0 ? 1 : 0);
  return { suite: "vitest", passed: json.numPassedTests, failed, skipped: json.numPendingTests + json.numTodoTests };
}

// Asynchronous, unlike vitest's run: this process supervises the stack meanwhile (a worker that dies is
// started again by a timer here, which a synchronous wait would hold back until the browser tests end).
async function runPlaywright(env: NodeJS.ProcessEnv): Promise<SuiteCount> {
  const report = path.join(outputDir, "playwright.json");
  const child = spawn(process.execPath, [path.join(projectRoot, "node_modules/@playwright/test/cli.js"), "test", "--config", "tests/e2e/playwright.config.ts"], {
    cwd: projectRoot,
    env,
    stdio: "inherit",
  });
  const result = await new Promise<{ status: number | null }>((resolve) => {
    child.once("error", () => resolve({ status: 1 }));
    child.once("exit", (code) => resolve({ status: code }));
  });
  const json = readJson(report);
  if (!json?.stats) return { suite: "playwright", passed: 0, failed: 1, skipped: 0 };
  const { expected = 0, unexpected = 0, flaky = 0, skipped = 0 } = json.stats;
  const errors = (json.errors ?? []).length;
  const failed = unexpected + flaky + errors + (result.status !== 0 && unexpected + flaky + errors === 0 ? 1 : 0);
  return { suite: "playwright", passed: expected, failed, skipped };
}

async function main(): Promise<number> {
  rmSync(outputDir, { recursive: true, force: true });
  mkdirSync(outputDir, { recursive: true });
  // Tests never read the developer's .env.local: their own secret, database and ports.
  process.env.AUTH_SECRET = randomBytes(32).toString("base64url");
  delete process.env.SMTP_URL;
  const options: StackOptions = {
    profile: "test",
    webPort: Number(process.env.SPILLWAY_TEST_WEB_PORT ?? 3100),
    smtpPort: Number(process.env.SPILLWAY_TEST_SMTP_PORT ?? 2625),
    freshDatabase: true,
    log,
  };
  const counts: SuiteCount[] = [];
  ensureChromium();

  const { databaseUrl, stopDatabase } = await prepareDatabase(options);
  const env = stackEnvironment(options, databaseUrl);
  await bundleWorkers({ log });
  try {
    log("Running unit and integration tests (vitest) ...");
    counts.push(runVitest({ ...env, NODE_ENV: "test" }));
  } finally {
    stopDatabase();
  }

  log("Starting the stack for the browser tests ...");
  let stack;
  try {
    stack = await startStack(options);
  } catch (error) {
    console.error(`[test] ${(error as Error).message}`);
    counts.push({ suite: "playwright", passed: 0, failed: 1, skipped: 0 });
  }
  if (stack) {
    stack.supervisor.onRestart = (name, code, delayMs) => log(`${name} exited (status ${code}); starting it again in ${delayMs / 1000} s (see tests/.output/stack/${name}.log).`);
    stack.supervisor.onUnexpectedExit = (name, code) => log(`${name} exited unexpectedly (status ${code}); see tests/.output/stack/${name}.log.`);
    try {
      counts.push(await runPlaywright({ ...stack.env }));
    } finally {
      await stack.stop();
    }
  }

  const passed = counts.reduce((s, c) => s + c.passed, 0);
  const failed = counts.reduce((s, c) => s + c.failed, 0);
  const skipped = counts.reduce((s, c) => s + c.skipped, 0);
  for (const c of counts) log(`${c.suite}: ${c.passed} passed, ${c.failed} failed${c.skipped ? `, ${c.skipped} skipped` : ""}`);
  console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
  return failed > 0 || passed === 0 ? 1 : 0;
}

main().then(
  (code) => process.exit(code),
  (error) => {
    console.error(`[test] ${error.message}`);
    console.log("0 passed, 1 failed");
    process.exit(error instanceof StackError ? error.exitCode : 1);
  },
);
