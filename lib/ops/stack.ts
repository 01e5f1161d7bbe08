// Brings up PostgreSQL, migrations, seed, build, fake mail, web and worker: shared by `npm start` and `npm test`.
import { connectionUrl, dropDatabase, embeddedConfig, ensureDatabase, portIsFree, PostgresSetupError, startEmbeddedPostgres, stopEmbeddedPostgres } from "../../db/postgres";
import { runMigrations } from "../../db/migrate";
import { createDatabase } from "../../db/client";
import { seedDemo } from "../../db/seed";
import { buildIfNeeded, nextBin, nodeWithTsx, Supervisor, waitForHttp, workerCount } from "./processes";
import { bundleWorkers, defaultBundleDir } from "./bundle";
import { projectRoot } from "./environment";
import path from "node:path";

export interface StackOptions {
  profile: "dev" | "test";
  webPort: number;
  smtpPort: number;
  /** Only for tests: start from an empty database every run. */
  freshDatabase: boolean;
  log: (line: string) => void;
}

export interface RunningStack {
  env: NodeJS.ProcessEnv;
  appUrl: string;
  databaseUrl: string;
  supervisor: Supervisor;
  stop(): Promise<void>;
}

export class StackError extends Error {
  constructor(
    message: string,
    readonly exitCode = 1,
  ) {
    super(message);
  }
}

/** Starts (or reuses) the database and returns its URL, migrated and seeded. */
export async function prepareDatabase(options: StackOptions): Promise<{ databaseUrl: string; stopDatabase: () => void }> {
  const externalUrl = options.profile === "test" ? process.env.TEST_DATABASE_URL : process.env.DATABASE_URL;
  let databaseUrl: string;
  let stopDatabase = () => {};
  if (externalUrl) {
    options.log(`Using the PostgreSQL server from ${options.profile === "test" ? "TEST_DATABASE_URL" : "DATABASE_URL"}; the embedded one is not started.`);
    databaseUrl = externalUrl;
  } else {
    const config = embeddedConfig(options.profile);
    try {
      const { startedHere } = await startEmbeddedPostgres(config, options.log);
      if (startedHere) stopDatabase = () => stopEmbeddedPostgres(config);
      if (options.freshDatabase) {
        await dropDatabase(config, config.database);
        await ensureDatabase(config, config.database);
      }
    } catch (error) {
      if (error instanceof PostgresSetupError) throw new StackError(`PostgreSQL: ${error.message}`, error.exitCode);
      throw error;
    }
    databaseUrl = connectionUrl(config);
  }
  options.log("Applying migrations ...");
  await runMigrations(databaseUrl);
  const { db, pool } = createDatabase(databaseUrl, 2);
  try {
    await seedDemo(db);
  } finally {
    await pool.end();
  }
  options.log("Demo workspace seeded.");
  return { databaseUrl, stopDatabase };
}

/** Preloaded into the web server: client address, JSON shape of every /api/v1 error (see the file). */
const webHooks = path.join(projectRoot, "lib/ops/web-hooks.cjs");

export function stackEnvironment(options: StackOptions, databaseUrl: string): NodeJS.ProcessEnv {
  // Next rewrites loopback hosts to localhost, so links and cookies must say localhost too.
  const appUrl = `http://localhost:${options.webPort}`;
  const fakeMail = !process.env.SMTP_URL || options.profile === "test";
  return {
    ...process.env,
    NODE_ENV: "production",
    DATABASE_URL: databaseUrl,
    APP_URL: appUrl,
    AUTH_URL: `${appUrl}/api/v1/auth`,
    AUTH_TRUST_HOST: "true",
    SMTP_URL: fakeMail ? `smtp://127.0.0.1:${options.smtpPort}` : process.env.SMTP_URL,
    SPILLWAY_FAKE_MAIL: fakeMail ? "1" : "0",
    SPILLWAY_SMTP_PORT: String(options.smtpPort),
    SPILLWAY_DIST_DIR: options.profile === "test" ? ".next-test" : ".next",
    SPILLWAY_BUNDLE_DIR: defaultBundleDir,
    NEXT_TELEMETRY_DISABLED: "1",
  };
}

export async function startStack(options: StackOptions): Promise<RunningStack> {
  for (const [what, port] of [["web server", options.webPort], ["fake SMTP receiver", options.smtpPort]] as const) {
    if (!(await portIsFree(port))) {
      throw new StackError(`port ${port} on 127.0.0.1 (for the ${what}) is already in use. Stop whatever holds it and try again.`, 3);
    }
  }
  const workers = workerCount(); // a bad SPILLWAY_WORKERS stops here, before anything starts
  const { databaseUrl, stopDatabase } = await prepareDatabase(options);
  const env = stackEnvironment(options, databaseUrl);
  await bundleWorkers({ log: options.log });
  if (!buildIfNeeded(env, options.log)) {
    stopDatabase();
    throw new StackError("next build failed; see the messages above.");
  }
  const supervisor = new Supervisor();
  const quiet = options.profile === "test";
  // The test stack keeps each process's output in tests/.output/stack/<name>.log, for reading after a failure.
  const output = (name: string) => ({ quiet, ...(quiet ? { logFile: path.join(projectRoot, "tests/.output/stack", `${name}.log`) } : {}) });
  if (env.SPILLWAY_FAKE_MAIL === "1") supervisor.start("mail", nodeWithTsx("lib/mail/fake-smtp-server.ts"), env, output("mail"));
  supervisor.start("web", ["--require", webHooks, nextBin, "start", "--hostname", "127.0.0.1", "--port", String(options.webPort)], env, output("web"));
  const stop = async () => {
    await supervisor.stopAll();
    stopDatabase();
  };
  const appUrl = env.APP_URL!;
  // The health check starts the web's queue client, which creates pg-boss's schema and queues; workers start
  // after it, because two clients doing that at once can deadlock in PostgreSQL (seen: a worker dying at start).
  if (!(await waitForHttp(`${appUrl}/api/v1/health`, 60_000))) {
    await stop();
    throw new StackError(`the web server did not answer at ${appUrl} within 60 s.`);
  }
  // Workers restart with backoff when they die; the web server keeps serving meanwhile.
  for (let i = 1; i <= workers; i++) supervisor.start(`worker-${i}`, nodeWithTsx("worker/main.ts"), env, { ...output(`worker-${i}`), restart: true });
  return { env, appUrl, databaseUrl, supervisor, stop };
}
