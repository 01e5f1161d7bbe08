// Every environment variable the running app reads, in one place. Server and Node scripts only: nothing the
// browser bundles imports this file (client components get what they need as props).
// Read lazily, so tests and `npm start` can set the environment before the first use.

const env = (name: string): string | undefined => {
  const value = process.env[name];
  return value === undefined || value === "" ? undefined : value;
};

const wholeNumber = (name: string, fallback: number, min: number): number => {
  const raw = env(name);
  if (raw === undefined) return fallback;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < min) throw new Error(`${name} must be a whole number of at least ${min}, not "${raw}".`);
  return value;
};

const positiveInteger = (name: string, fallback: number): number => wholeNumber(name, fallback, 1);

export function databaseUrl(): string {
  const url = env("DATABASE_URL");
  if (!url) throw new Error("DATABASE_URL is not set; start Spillway with `npm start`, which sets it.");
  return url;
}

/** The address people use to reach the app (links in e-mail, the allowed Origin of state-changing requests). */
export function appUrl(): string {
  return (env("APP_URL") ?? "http://localhost:3000").replace(/\/$/, "");
}

export function appOrigin(): string {
  return new URL(appUrl()).origin;
}

/**
 * Served to browsers over HTTPS (directly or behind a TLS-terminating proxy): session cookies get `Secure`
 * and responses carry Strict-Transport-Security. On when APP_URL starts with https:, or SPILLWAY_HTTPS=1.
 */
export function servedOverHttps(): boolean {
  return appUrl().startsWith("https:") || env("SPILLWAY_HTTPS") === "1";
}

/**
 * Behind a reverse proxy that sets X-Forwarded-For, SPILLWAY_TRUST_PROXY=1 makes its first address the client
 * (for the per-client sign-in limit). Without it, the address Next's own server recorded is used.
 */
export function trustProxy(): boolean {
  return env("SPILLWAY_TRUST_PROXY") === "1";
}

export function authSecret(): string | undefined {
  return env("AUTH_SECRET");
}

export const mailConfig = {
  smtpUrl: (): string | undefined => env("SMTP_URL"),
  from: (): string => env("MAIL_FROM") ?? "Spillway <no-reply@spillway.test>",
  /** The local fake SMTP receiver stands in for real mail (dev and tests): the Mailbox page exists only then. */
  fake: (): boolean => env("SPILLWAY_FAKE_MAIL") === "1",
  /** Port of the local fake SMTP receiver. */
  fakePort: (): number => positiveInteger("SPILLWAY_SMTP_PORT", 2525),
};

/** `next dev` rather than a production build (dev-only allowances such as eval for fast refresh). */
export function isDevelopment(): boolean {
  return env("NODE_ENV") === "development";
}

/** Where `lib/ops/bundle.ts` writes the plain-JavaScript worker-thread entries. */
export function bundleDir(): string | undefined {
  return env("SPILLWAY_BUNDLE_DIR");
}

/** The interactive analytic pool (see lib/analytic-pool). */
export const analyticPoolConfig = {
  threads: (): number => positiveInteger("SPILLWAY_ANALYTIC_THREADS", 2),
  /** Wall-clock budget of one interactive evaluation before it is stopped and answered with 422. */
  budgetMs: (): number => positiveInteger("SPILLWAY_ANALYTIC_BUDGET_MS", 3_000),
  /** Evaluations one user may have in flight at once; more are refused with 429. */
  perUser: (): number => positiveInteger("SPILLWAY_ANALYTIC_PER_USER", 2),
};

/** A worker process's settings (`npm run worker`, and each process `npm start` supervises). */
export const workerConfig = {
  /** Replication threads per worker process; default one per core. */
  threads: (cores: number): number => positiveInteger("SPILLWAY_WORKER_THREADS", cores),
  /** Chunks a process fetches ahead of its free threads, so a thread never waits on the queue. */
  chunkLookahead: (): number => positiveInteger("SPILLWAY_CHUNK_LOOKAHEAD", 4),
  /** Seconds a stopping worker lets running chunks finish before it hands them back to the queue (0: at once). */
  graceSeconds: (): number => wholeNumber("SPILLWAY_WORKER_GRACE_SECONDS", 20, 0),
};
