// Issue #7's "done when": with an API token made by the demo engineer, a run, a sweep, a grid and a
// dimensioning search submitted over the API finish on the worker, with progress visible while they run.
import { expect, request as requestContext, test, type APIRequestContext } from "@playwright/test";
import { signInAs } from "./support/helpers";

const ws = "kestrel-fen";
const path = (p: string) => `/api/v1/workspaces/${ws}${p}`;
const finished = new Set(["succeeded", "failed", "cancelled"]);

/** Invented busy-hour traffic on a 30-circuit group: a few seconds of work for one worker. */
const scenario = (replications: number, calls: number) => ({
  servers: 30,
  arrivals: { process: "poisson", rate: 24 },
  holding: { law: "exponential", mean: 1 },
  run: { seed: 4242, replications, callsPerReplication: calls, warmupCalls: 2000 },
});

interface Observed {
  final: Record<string, any>;
  /** Every non-final answer seen while polling. */
  live: Record<string, any>[];
}

async function waitFor(api: APIRequestContext, url: string, timeoutMs: number): Promise<Observed> {
  const live: Record<string, any>[] = [];
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const response = await api.get(url);
    expect(response.status()).toBe(200);
    const body = await response.json();
    if (finished.has(body.status)) return { final: body, live };
    live.push(body);
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`${url} did not finish within ${timeoutMs} ms`);
}

test("a token submits a run, a sweep, a grid and a sizing search that finish with progress visible", async ({ page, baseURL }) => {
  test.setTimeout(300_000);
  await signInAs(page, "engineer");
  const created = await page.request.post(path("/tokens"), { data: { name: "background-runs e2e" } });
  expect(created.status()).toBe(201);
  const { token } = await created.json();
  const api = await requestContext.newContext({ baseURL, extraHTTPHeaders: { authorization: `Bearer ${token}` } });

  // Without the token the same request is refused.
  const anonymous = await requestContext.newContext({ baseURL });
  expect((await anonymous.post(path("/runs"), { data: { scenario: scenario(4, 1000) } })).status()).toBe(401);

  const run = await api.post(path("/runs"), { data: { scenario: scenario(40, 200_000), name: "e2e run" } });
  expect(run.status()).toBe(202);
  const runId = (await run.json()).id;
  const sweep = await api.post(path("/sweeps"), { data: { scenario: scenario(6, 20_000), parameter: "offeredTraffic", values: [18, 22, 26] } });
  const grid = await api.post(path("/sweeps"), {
    data: { scenario: scenario(6, 20_000), kind: "grid", x: { parameter: "offeredTraffic", values: [15, 20] }, y: { parameter: "peakedness", values: [1, 2] }, targetBlocking: 0.01 },
  });
  const search = await api.post(path("/sweeps"), { data: { scenario: scenario(8, 20_000), kind: "dimensioning", targetBlocking: 0.01, maxProbes: 12 } });
  for (const r of [sweep, grid, search]) expect(r.status(), await r.text()).toBe(202);

  // Poll all four from the moment they are accepted, so each one's unfinished states are seen.
  const sweepIds = await Promise.all([sweep, grid, search].map(async (r) => (await r.json()).id as string));
  const watching = Promise.all(sweepIds.map((id) => waitFor(api, path(`/sweeps/${id}`), 240_000)));
  const ranRun = await waitFor(api, path(`/runs/${runId}`), 240_000);
  expect(ranRun.final.status).toBe("succeeded");
  expect(ranRun.final.progress).toEqual({ replicationsDone: 40, replicationsPlanned: 40, fraction: 1 });
  expect(ranRun.final.result.replications).toBe(40);
  expect(ranRun.final.result.references[0].method).toBe("Erlang B");
  // Progress was visible while it ran: some poll saw it unfinished, and what it reported never went backwards.
  expect(ranRun.live.length).toBeGreaterThan(0);
  const fractions = ranRun.live.map((r) => r.progress.fraction);
  expect(fractions).toEqual([...fractions].sort((a, b) => a - b));
  expect(ranRun.live.some((r) => r.status === "running" && r.progress.fraction > 0 && r.progress.fraction < 1)).toBe(true);

  const sweeps = await watching;
  for (const s of sweeps) {
    expect(s.final.status).toBe("succeeded");
    expect(s.final.progress.fraction).toBe(1);
    expect(s.live.length).toBeGreaterThan(0);
  }
  const [curve, map, sizing] = sweeps.map((s) => s.final);
  expect(curve.runs).toHaveLength(3);
  expect(curve.result.kind).toBe("sweep");
  expect(map.result.kind).toBe("grid");
  expect(map.result.cells).toHaveLength(4);
  expect(sizing.result.kind).toBe("dimensioning");
  expect(sizing.result.formula.servers).toBeGreaterThan(0);
  expect(sizing.result.simulated.servers).toBeGreaterThan(0);

  const csv = await api.get(path(`/runs/${runId}/export.csv`));
  expect(csv.headers()["content-type"]).toMatch(/^text\/csv/);
  expect(await csv.text()).toMatch(/^measure,estimate,/);
  await api.dispose();
  await anonymous.dispose();
});
