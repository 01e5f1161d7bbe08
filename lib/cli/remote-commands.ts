// `submit`: send a scenario file to a Spillway server as a background run, optionally wait for it with progress
// on stderr, and print what a local `simulate` prints (the same table, or the same JSON with --json).
import { CliUsageError, type CliCommand, type CliOutput } from "./command";
import { readScenarioFile, simulationTable } from "./simulation-commands";
import type { ApiErrorBody, JobAccepted, RunResponse } from "../jobs/api-types";

/** The server refused the request for a reason the caller can fix (400): exit 2, like any bad input. */
export class RemoteInputError extends Error {
  readonly kind = "input" as const;
}

/** The server or the connection failed, or the run did: exit 1 with this one line. */
export class RemoteError extends Error {
  readonly kind = "remote" as const;
}

export interface RemoteIo {
  fetch: typeof fetch;
  env: Record<string, string | undefined>;
  /** Progress lines. */
  stderr: (text: string) => void;
  /** True when stderr is a terminal (progress rewrites one line instead of adding lines). */
  interactive: boolean;
  sleep: (ms: number) => Promise<void>;
}

const defaultIo: RemoteIo = {
  fetch: (...args) => fetch(...args),
  env: process.env,
  stderr: (text) => process.stderr.write(text),
  interactive: !!process.stderr.isTTY,
  sleep: (ms) => new Promise((resolve) => setTimeout(resolve, ms)),
};

const USAGE = "usage: submit <scenario.json> --server URL --workspace SLUG [--token T] [--name LABEL] [--wait] [--poll SECONDS] [--json]";

export interface SubmitOptions {
  file: string;
  server: string;
  workspace: string;
  token: string;
  name?: string;
  wait: boolean;
  pollMs: number;
}

/** Flags, with the token from --token or SPILLWAY_TOKEN (the environment keeps it out of the process list). */
export function parseSubmitArgs(argv: string[], env: RemoteIo["env"]): SubmitOptions {
  const flags: Record<string, string> = {};
  let file: string | undefined;
  let wait = false;
  for (let i = 0; i < argv.length; i++) {
    const arg = argv[i];
    if (arg === "--wait") {
      if (wait) throw new CliUsageError("--wait given twice; give each flag once");
      wait = true;
    } else if (["--server", "--workspace", "--token", "--name", "--poll"].includes(arg)) {
      if (flags[arg.slice(2)] !== undefined) throw new CliUsageError(`${arg} given twice; give each flag once`);
      const value = argv[++i];
      if (value === undefined || value.startsWith("--")) throw new CliUsageError(`${arg}: needs a value; ${USAGE}`);
      flags[arg.slice(2)] = value;
    } else if (arg.startsWith("--")) throw new CliUsageError(`unknown flag ${arg}; ${USAGE}`);
    else if (file === undefined) file = arg;
    else throw new CliUsageError(`unexpected argument "${arg}"; ${USAGE}`);
  }
  if (!file) throw new CliUsageError(`missing scenario file; ${USAGE}`);
  const server = flags.server ?? env.SPILLWAY_SERVER;
  if (!server) throw new CliUsageError(`--server: required (or set SPILLWAY_SERVER), e.g. --server http://localhost:3000`);
  let url: URL;
  try {
    url = new URL(server);
  } catch {
    throw new CliUsageError(`--server: "${server}" is not a URL; give e.g. http://localhost:3000`);
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") throw new CliUsageError(`--server: must be an http or https URL, not ${url.protocol}`);
  const workspace = flags.workspace;
  if (!workspace) throw new CliUsageError(`--workspace: required (the workspace's short name in its URL, e.g. kestrel-fen)`);
  if (!/^[a-z0-9](?:[a-z0-9-]{0,62}[a-z0-9])?$/.test(workspace)) throw new CliUsageError(`--workspace: "${workspace}" is not a workspace short name (lower-case letters, digits and hyphens)`);
  const token = flags.token ?? env.SPILLWAY_TOKEN;
  if (!token) throw new CliUsageError("--token: required (or set SPILLWAY_TOKEN); create one under your workspace's API tokens");
  const poll = flags.poll === undefined ? 1 : Number(flags.poll);
  if (!Number.isFinite(poll) || poll < 0.1 || poll > 60) throw new CliUsageError("--poll: must be a number of seconds from 0.1 to 60");
  if (flags.name !== undefined && flags.name.length > 200) throw new CliUsageError("--name: must be at most 200 characters");
  return { file, server: url.toString().replace(/\/$/, ""), workspace, token, name: flags.name, wait, pollMs: poll * 1000 };
}

/** One request; the API's error shape becomes one line naming the fields. */
async function request<T>(io: RemoteIo, options: SubmitOptions, path: string, init: { method?: string; body?: unknown } = {}): Promise<T> {
  const url = `${options.server}/api/v1/workspaces/${options.workspace}${path}`;
  let response: Response;
  try {
    response = await io.fetch(url, {
      method: init.method ?? "GET",
      headers: { authorization: `Bearer ${options.token}`, accept: "application/json", ...(init.body !== undefined ? { "content-type": "application/json" } : {}) },
      body: init.body === undefined ? undefined : JSON.stringify(init.body),
    });
  } catch (error) {
    const cause = (error as { cause?: { code?: string; message?: string } }).cause;
    throw new RemoteError(`cannot reach ${options.server}: ${cause?.code ?? cause?.message ?? (error as Error).message}`);
  }
  const text = await response.text();
  let body: unknown;
  try {
    body = text ? JSON.parse(text) : undefined;
  } catch {
    throw new RemoteError(`${options.server} answered ${response.status} with something that is not Spillway's JSON; is --server right?`);
  }
  if (response.ok) return body as T;
  const error = (body as Partial<ApiErrorBody> | undefined)?.error;
  const detail = error?.fields ? Object.entries(error.fields).map(([field, message]) => `${field}: ${message}`).join("; ") : (error?.message ?? `HTTP ${response.status}`);
  if (response.status === 400 || response.status === 413 || response.status === 415) throw new RemoteInputError(`the server refused it: ${detail}`);
  if (response.status === 401) throw new RemoteError(`the server did not accept the token (401): ${detail}`);
  throw new RemoteError(`the server answered ${response.status}: ${detail}`);
}

function progressLine(run: RunResponse): string {
  const { replicationsDone, replicationsPlanned, fraction } = run.progress;
  return `run ${run.id}: ${run.status}, ${replicationsDone}/${replicationsPlanned} replications (${Math.floor(fraction * 100)}%)`;
}

/** Polls until the run ends, writing progress to stderr when it changes; a few failed polls in a row end the wait. */
async function waitForRun(io: RemoteIo, options: SubmitOptions, id: string): Promise<RunResponse> {
  let last = "";
  let failures = 0;
  for (;;) {
    let run: RunResponse;
    try {
      run = await request<RunResponse>(io, options, `/runs/${encodeURIComponent(id)}`);
      failures = 0;
    } catch (error) {
      // A restarting server should not lose the wait; five misses in a row (about five polls) do.
      if (!(error instanceof RemoteError) || ++failures >= 5) throw error;
      await io.sleep(options.pollMs);
      continue;
    }
    const line = progressLine(run);
    if (line !== last) io.stderr(io.interactive ? `\r${line}\x1b[K` : `${line}\n`);
    last = line;
    if (run.status !== "queued" && run.status !== "running") {
      if (io.interactive) io.stderr("\n");
      return run;
    }
    await io.sleep(options.pollMs);
  }
}

export async function submitScenario(argv: string[], io: RemoteIo = defaultIo): Promise<CliOutput> {
  const options = parseSubmitArgs(argv, io.env);
  const scenario = readScenarioFile(options.file);
  const accepted = await request<JobAccepted>(io, options, "/runs", { method: "POST", body: { scenario, ...(options.name ? { name: options.name } : {}) } });
  const runUrl = `${options.server}/api/v1/workspaces/${options.workspace}/runs/${accepted.id}`;
  if (!options.wait) return { json: { ...accepted }, table: `run ${accepted.id} ${accepted.status}: ${runUrl}\n(add --wait to wait for the result)` };
  const run = await waitForRun(io, options, accepted.id);
  if (run.status === "succeeded" && run.result) return { json: run.result as unknown as Record<string, unknown>, table: simulationTable(run.result) };
  if (run.status === "failed") throw new RemoteError(`run ${run.id} failed: ${run.error ?? "no reason given"}`);
  throw new RemoteError(`run ${run.id} was ${run.status}${run.partial ? " (a partial result is on the server)" : ""}: ${runUrl}`);
}

export const remoteCommands: CliCommand[] = [
  {
    name: "submit",
    summary: "submit <scenario.json> --server URL --workspace SLUG [--token T] [--wait]: run it on a Spillway server (token also from SPILLWAY_TOKEN)",
    run: (argv) => submitScenario(argv),
  },
];
