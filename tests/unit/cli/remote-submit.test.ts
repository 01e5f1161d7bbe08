// `submit` against a tiny local HTTP server that speaks the run API: the output equals a local `simulate`'s,
// progress goes to stderr, and every failure is one line with exit 2 (bad input) or 1 (server, connection, run).
import { spawn } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { simulationTable } from "../../../lib/cli/simulation-commands";
import { submitScenario, type RemoteIo } from "../../../lib/cli/remote-commands";
import { parseScenario, type SimulationResult } from "../../../lib/simulation";
import { runScenario } from "../../../lib/simulation/node";

const root = path.join(__dirname, "../../..");
const tsx = path.join(root, "node_modules/.bin/tsx");
const dir = mkdtempSync(path.join(os.tmpdir(), "spillway-submit-"));
const token = "spw_test-token-abcdefghijklmnopqrstuvwxyz";
const scenario = { servers: 5, arrivals: { process: "poisson", rate: 4 }, holding: { law: "exponential", mean: 1 }, run: { seed: 3, replications: 4, callsPerReplication: 5000 } };
const scenarioFile = path.join(dir, "ok.json");
writeFileSync(scenarioFile, JSON.stringify(scenario));

/** What the fake server does next; `seen` records what the CLI sent. */
const server = {
  mode: "succeed" as "succeed" | "fail" | "refuse" | "unauthorised" | "cancel",
  polls: 0,
  seen: [] as { method: string; url: string; authorization?: string; body: unknown }[],
};
let result: SimulationResult;
let http: Server;
let base: string;

function reply(res: ServerResponse, status: number, body: unknown) {
  res.writeHead(status, { "content-type": "application/json" });
  res.end(JSON.stringify(body));
}

async function handle(req: IncomingMessage, res: ServerResponse) {
  let text = "";
  for await (const chunk of req) text += chunk;
  server.seen.push({ method: req.method!, url: req.url!, authorization: req.headers.authorization, body: text ? JSON.parse(text) : undefined });
  if (req.headers.authorization !== `Bearer ${token}` || server.mode === "unauthorised")
    return reply(res, 401, { error: { status: 401, code: "unauthenticated", message: "The API token is not valid." } });
  if (req.method === "POST" && req.url === "/api/v1/workspaces/kestrel-fen/runs") {
    if (server.mode === "refuse") return reply(res, 400, { error: { status: 400, code: "invalid-input", message: "Some fields are not valid.", fields: { "scenario.run.callsPerReplication": "too many calls (quota callsPerRun)" } } });
    return reply(res, 202, { id: "run-1", status: "queued" });
  }
  if (req.method === "GET" && req.url === "/api/v1/workspaces/kestrel-fen/runs/run-1") {
    server.polls++;
    const done = server.polls >= 3;
    const progress = { replicationsDone: done ? 4 : server.polls * 2 - 2, replicationsPlanned: 4, fraction: done ? 1 : (server.polls - 1) / 2 };
    const status = !done ? (server.polls === 1 ? "queued" : "running") : server.mode === "fail" ? "failed" : server.mode === "cancel" ? "cancelled" : "succeeded";
    return reply(res, 200, { id: "run-1", status, progress, partial: false, error: status === "failed" ? "arrivals.rates: the chain is not irreducible" : null, ...(status === "succeeded" ? { result } : {}) });
  }
  reply(res, 404, { error: { status: 404, code: "not-found", message: "No such workspace or record." } });
}

beforeAll(async () => {
  result = await runScenario(parseScenario(scenario));
  http = createServer((req, res) => void handle(req, res));
  await new Promise<void>((resolve) => http.listen(0, "127.0.0.1", resolve));
  base = `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
});
afterAll(() => new Promise<void>((resolve) => http.close(() => resolve())));
beforeEach(() => {
  server.mode = "succeed";
  server.polls = 0;
  server.seen = [];
});

/** The real CLI entry in a child process (async, so this process's server keeps answering). */
function cli(args: string[], env: Record<string, string> = {}): Promise<{ status: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(tsx, ["lib/cli/main.ts", "submit", ...args], { cwd: root, env: { ...process.env, SPILLWAY_TOKEN: "", ...env } });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += d));
    child.stderr.on("data", (d) => (stderr += d));
    child.on("close", (status) => resolve({ status, stdout, stderr }));
  });
}

const io = (lines: string[]): RemoteIo => ({ fetch, env: {}, stderr: (t) => lines.push(t), interactive: false, sleep: async () => {} });
const flags = () => ["--server", base, "--workspace", "kestrel-fen", "--token", token];

describe("submit", () => {
  it("--wait prints exactly the local simulate table; progress goes to stderr; the token rides in the header", async () => {
    const r = await cli([scenarioFile, "--server", base, "--workspace", "kestrel-fen", "--wait", "--poll", "0.1"], { SPILLWAY_TOKEN: token });
    expect(r.status).toBe(0);
    expect(r.stdout).toBe(`${simulationTable(result)}\n`);
    expect(r.stderr.trim().split("\n")).toEqual([
      "run run-1: queued, 0/4 replications (0%)",
      "run run-1: running, 2/4 replications (50%)",
      "run run-1: succeeded, 4/4 replications (100%)",
    ]);
    expect(server.seen[0]).toMatchObject({ method: "POST", authorization: `Bearer ${token}`, body: { scenario: parseScenario(scenario) } });
  });

  it("--json --wait prints the result exactly as `simulate --json` would; without --wait it prints {id, status}", async () => {
    const waited = await submitScenario([scenarioFile, ...flags(), "--wait", "--name", "nightly"], io([]));
    expect(JSON.stringify(waited.json)).toBe(JSON.stringify(result));
    expect((server.seen[0].body as { name: string }).name).toBe("nightly");
    server.polls = 0;
    const queued = await submitScenario([scenarioFile, ...flags()], io([]));
    expect(queued.json).toEqual({ id: "run-1", status: "queued" });
    expect(queued.table).toContain(`${base}/api/v1/workspaces/kestrel-fen/runs/run-1`);
  });

  it("exits 2 with one line for bad input, before or at the server", async () => {
    const noToken = await cli([scenarioFile, "--server", base, "--workspace", "kestrel-fen"]);
    expect([noToken.status, noToken.stderr]).toEqual([2, "submit: --token: required (or set SPILLWAY_TOKEN); create one under your workspace's API tokens\n"]);
    const badFile = path.join(dir, "bad.json");
    writeFileSync(badFile, JSON.stringify({ ...scenario, servers: 0 }));
    const local = await cli([badFile, ...flags()]);
    expect(local.status).toBe(2);
    expect(local.stderr).toMatch(/^submit: .*bad\.json: servers: must be >= 1\n$/);
    expect(server.seen).toEqual([]);
    const badServer = await cli([scenarioFile, "--server", "localhost:3000", "--workspace", "kestrel-fen", "--token", token]);
    expect(badServer.status).toBe(2);
    expect(badServer.stderr).toMatch(/--server: must be an http or https URL/);

    server.mode = "refuse";
    const refused = await cli([scenarioFile, ...flags()]);
    expect([refused.status, refused.stdout]).toEqual([2, ""]);
    expect(refused.stderr).toBe("submit: the server refused it: scenario.run.callsPerReplication: too many calls (quota callsPerRun)\n");
  });

  it("exits 1 with one line when the token is refused, the server is unreachable, or the run fails", async () => {
    server.mode = "unauthorised";
    const unauthorised = await cli([scenarioFile, ...flags()]);
    expect([unauthorised.status, unauthorised.stderr]).toEqual([1, "submit: the server did not accept the token (401): The API token is not valid.\n"]);

    // A port that was just free: nothing listens there.
    const probe = createServer();
    await new Promise<void>((resolve) => probe.listen(0, "127.0.0.1", resolve));
    const closed = `http://127.0.0.1:${(probe.address() as AddressInfo).port}`;
    await new Promise<void>((resolve) => probe.close(() => resolve()));
    const unreachable = await cli([scenarioFile, "--server", closed, "--workspace", "kestrel-fen", "--token", token]);
    expect(unreachable.status).toBe(1);
    expect(unreachable.stderr).toBe(`submit: cannot reach ${closed}: ECONNREFUSED\n`);

    server.mode = "fail";
    await expect(submitScenario([scenarioFile, ...flags(), "--wait"], io([]))).rejects.toThrow("run run-1 failed: arrivals.rates: the chain is not irreducible");
    server.mode = "cancel";
    server.polls = 0;
    await expect(submitScenario([scenarioFile, ...flags(), "--wait"], io([]))).rejects.toMatchObject({ kind: "remote", message: expect.stringMatching(/^run run-1 was cancelled/) });
  });
});
